import type { AppContext } from '../context'
import { createItem, listItems, updateItem } from '../http/itemRoutes'
import { EDITORS, STAFF } from '../../shared/constants'
import type { RouteDef } from '../http/routeTable'
import { createExcerpt, listExcerpts, updateExcerpt } from './service'
import { createExcerptBody, updateExcerptBody } from '../../shared/schemas/clips'

export function excerptRoutes(ctx: AppContext): RouteDef[] {
  return [
    listItems({
      path: '/',
      roles: STAFF,
      key: 'excerpts',
      list: () => listExcerpts(ctx.knex),
    }),
    createItem({
      path: '/',
      roles: EDITORS,
      key: 'excerpt',
      body: createExcerptBody,
      create: (body, actor) => createExcerpt(ctx, body, actor),
    }),
    updateItem({
      path: '/:id',
      roles: EDITORS,
      key: 'excerpt',
      body: updateExcerptBody,
      update: (id, body, actor) => updateExcerpt(ctx, id, body, actor),
    }),
  ]
}
