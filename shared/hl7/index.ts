export * from './values'
export * from './views'
export * from './access'
