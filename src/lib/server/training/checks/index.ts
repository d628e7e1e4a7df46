export * from './authoring';
export * from './attempts';
export * from './hash';
export * from './queries';
export * from './stats';
