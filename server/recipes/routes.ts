import type { AppContext } from '../context'
import { itemAction } from '../http/itemAction'
import { EDITORS, STAFF } from '../../shared/constants'
import { route, type RouteDef } from '../http/routeTable'
import { actorOf } from '../http/authenticate'
import { createRecipe, getRecipe, listRecipes, updateRecipe } from './service'
import {
  createRecipeBody,
  listRecipesQuery,
  recipeVersionBody,
  updateRecipeBody,
} from '../../shared/schemas/recipes'
import { archiveRecipe, createRecipeVersion, deleteRecipe, restoreRecipe } from './archive'
import { idParam } from '../../shared/schemas/common'

export function recipeRoutes(ctx: AppContext): RouteDef[] {
  return [
    route({
      method: 'get',
      path: '/',
      roles: STAFF,
      query: listRecipesQuery,
      handler: async (_req, res, { query }) => {
        res.json({ recipes: await listRecipes(ctx.knex, query) })
      },
    }),
    route({
      method: 'get',
      path: '/:id',
      roles: STAFF,
      params: idParam,
      handler: async (_req, res, { params }) => {
        res.json({ recipe: await getRecipe(ctx.knex, params.id) })
      },
    }),
    route({
      method: 'post',
      path: '/',
      roles: EDITORS,
      body: createRecipeBody,
      handler: async (req, res, { body }) => {
        res.status(201).json({ recipe: await createRecipe(ctx, body, actorOf(req)) })
      },
    }),
    route({
      method: 'patch',
      path: '/:id',
      roles: EDITORS,
      params: idParam,
      body: updateRecipeBody,
      handler: async (req, res, { params, body }) => {
        res.json({ recipe: await updateRecipe(ctx, params.id, body, actorOf(req)) })
      },
    }),
    itemAction({
      method: 'delete',
      path: '/:id',
      roles: EDITORS,
      act: (id, actor) => deleteRecipe(ctx, id, actor),
    }),
    route({
      method: 'post',
      path: '/:id/versions',
      roles: EDITORS,
      params: idParam,
      body: recipeVersionBody,
      handler: async (req, res, { params, body }) => {
        res
          .status(201)
          .json({ recipe: await createRecipeVersion(ctx, params.id, body, actorOf(req)) })
      },
    }),
    itemAction({
      method: 'post',
      path: '/:id/archive',
      roles: EDITORS,
      key: 'recipe',
      act: (id, actor) => archiveRecipe(ctx, id, actor),
    }),
    itemAction({
      method: 'post',
      path: '/:id/restore',
      roles: EDITORS,
      key: 'recipe',
      act: (id, actor) => restoreRecipe(ctx, id, actor),
    }),
  ]
}
