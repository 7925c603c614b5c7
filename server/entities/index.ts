// Every TypeORM entity, listed explicitly (globs do not work under the test runner's module loader).
import { User } from './User.js';

export const entities = [User];
export { User };
