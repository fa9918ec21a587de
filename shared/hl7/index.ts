export * from './values'
export * from './views'
