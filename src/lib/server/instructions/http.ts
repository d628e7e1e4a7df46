export { apiRefusal, pageRefusal } from '../errors';
