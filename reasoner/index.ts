// The reasoner's public API: one reasoning run (`reason`), the contract types, and the intake facade.

export { reason } from './reason.js';
export type * from './api.js';
export { InputError, loadOntology, profile, normalise, loadDatasets, addAssertionsToAbox } from './intake.js';
export { isFreshName } from './model/normal.js';
