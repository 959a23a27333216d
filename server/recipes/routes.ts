import type { AppContext } from '../context'
import { createItem, itemAction, listItems, readItem, updateItem } from '../http/itemRoutes'
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
    listItems({
      path: '/',
      roles: STAFF,
      key: 'recipes',
      query: listRecipesQuery,
      list: (query) => listRecipes(ctx.knex, query),
    }),
    readItem({
      path: '/:id',
      roles: STAFF,
      key: 'recipe',
      read: (id) => getRecipe(ctx.knex, id),
    }),
    createItem({
      path: '/',
      roles: EDITORS,
      key: 'recipe',
      body: createRecipeBody,
      create: (body, actor) => createRecipe(ctx, body, actor),
    }),
    updateItem({
      path: '/:id',
      roles: EDITORS,
      key: 'recipe',
      body: updateRecipeBody,
      update: (id, body, actor) => updateRecipe(ctx, id, body, actor),
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
