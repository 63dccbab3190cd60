export { setup, teardown } from '../helpers/server';
