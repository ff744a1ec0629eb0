// The electrical core: device models, solvers, transfer curves, chain regeneration,
// charge and leakage budgets. Pure computation; the client imports it for plots.

export * from './mos';
export * from './parameters';
export * from './roots';
export * from './network';
export * from './transfer';
export * from './chain';
export * from './charge';
