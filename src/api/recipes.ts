import type {
  CreateRecipeBody,
  ListRecipesQuery,
  Recipe,
  UpdateRecipeBody,
} from '@shared/schemas/recipes'
import { api } from './client'

export const recipesApi = {
  list: (query: Partial<ListRecipesQuery> = {}) =>
    api.get<{ recipes: Recipe[] }>('/recipes', query),
  create: (body: CreateRecipeBody) => api.post<{ recipe: Recipe }>('/recipes', body),
  update: (id: number, body: UpdateRecipeBody) =>
    api.patch<{ recipe: Recipe }>(`/recipes/${id}`, body),
}
