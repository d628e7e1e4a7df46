export * from './people';
export * from './stations';
export * from './audit';
export * from './instructions';
export * from './training';
export * from './certificates';
export * from './gate';
export * from './records';
