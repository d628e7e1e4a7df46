export * from './checklists';
export * from './signoffs';
