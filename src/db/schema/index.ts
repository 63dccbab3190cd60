export * from './accounts';
export * from './production';
export * from './system';
