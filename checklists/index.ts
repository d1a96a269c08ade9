/** Route templates as data: schema, validator, the demo sites' routes. Pure, browser-safe. */
export * from '../shared/route/template';
export * from './validate';
