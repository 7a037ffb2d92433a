/** The demand outlook (method.md, "Demand forecast for a term T"). */
export * from './data';
export * from './take-up';
export * from './choice';
export * from './metrics';
export * from './outlook';
