// The display places panels with the solver's fast placement kernel (planned once per pattern, no
// allocation per frame).
export { placePanels, planShape, type ShapePlan } from '../solver/outputs/placement';
