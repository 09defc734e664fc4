/** The caution every permit screen, e-mail and PDF carries with its figures (the engine's own words). */
export { CAUTION } from '@shared/engineering';
