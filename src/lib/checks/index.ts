/**
 * The pure numeric core: exact arithmetic, units, limits and judgement, ISO 286 fits, torque
 * tool suitability and measurement helpers. No framework imports; runs in browser and Node.
 */
export * from './exact';
export * from './units';
export * from './format';
export * from './limits';
export * from './iso286-ranges';
export * from './iso286-grades';
export * from './iso286-deviations';
export * from './iso286';
export * from './torque';
export * from './measure';
