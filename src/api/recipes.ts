import type {
  CreateRecipeBody,
  ListRecipesQuery,
  Recipe,
  RecipeVersionBody,
  UpdateRecipeBody,
} from '@shared/schemas/recipes'
import { api } from './client'

export const recipesApi = {
  list: (query: Partial<ListRecipesQuery> = {}) =>
    api.get<{ recipes: Recipe[] }>('/recipes', query),
  get: (id: number) => api.get<{ recipe: Recipe }>(`/recipes/${id}`),
  create: (body: CreateRecipeBody) => api.post<{ recipe: Recipe }>('/recipes', body),
  update: (id: number, body: UpdateRecipeBody) =>
    api.patch<{ recipe: Recipe }>(`/recipes/${id}`, body),
  /** A new version: only what changes is sent; the server copies the rest from the recipe. */
  createVersion: (id: number, changes: RecipeVersionBody) =>
    api.post<{ recipe: Recipe }>(`/recipes/${id}/versions`, changes),
  /** Refused (409) once a session or a clip uses the recipe: archive it instead. */
  remove: (id: number) => api.del<{ id: number }>(`/recipes/${id}`),
  archive: (id: number) => api.post<{ recipe: Recipe }>(`/recipes/${id}/archive`),
  restore: (id: number) => api.post<{ recipe: Recipe }>(`/recipes/${id}/restore`),
}
