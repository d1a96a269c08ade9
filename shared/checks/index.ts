export * from './spot-checks';
export * from './context';
