import type { AppContext } from '../context'
import { EDITORS, STAFF } from '../../shared/constants'
import type { RouteDef } from '../http/routeTable'
import { parse } from '../http/validate'
import { actorOf } from '../http/authenticate'
import { createRecipe, getRecipe, listRecipes, updateRecipe } from './service'
import { createRecipeBody, listRecipesQuery, updateRecipeBody } from '../../shared/schemas/recipes'
import { idParam } from '../../shared/schemas/common'

export function recipeRoutes(ctx: AppContext): RouteDef[] {
  return [
    {
      method: 'get',
      path: '/',
      roles: STAFF,
      handler: async (req, res) => {
        res.json({ recipes: await listRecipes(ctx.knex, parse(listRecipesQuery, req.query)) })
      },
    },
    {
      method: 'get',
      path: '/:id',
      roles: STAFF,
      handler: async (req, res) => {
        const { id } = parse(idParam, req.params)
        res.json({ recipe: await getRecipe(ctx.knex, id) })
      },
    },
    {
      method: 'post',
      path: '/',
      roles: EDITORS,
      handler: async (req, res) => {
        const body = parse(createRecipeBody, req.body)
        res.status(201).json({ recipe: await createRecipe(ctx, body, actorOf(req)) })
      },
    },
    {
      method: 'patch',
      path: '/:id',
      roles: EDITORS,
      handler: async (req, res) => {
        const { id } = parse(idParam, req.params)
        const body = parse(updateRecipeBody, req.body)
        res.json({ recipe: await updateRecipe(ctx, id, body, actorOf(req)) })
      },
    },
  ]
}
