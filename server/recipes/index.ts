// Recipes: the catalogue of string constructions under test, their versions, and archiving of
// recipes that sessions use (a used recipe's construction is frozen).
export { recipeRoutes } from './routes'
