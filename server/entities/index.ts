// Every TypeORM entity, listed explicitly (globs do not work under the test runner's module loader).
import { User } from './User.js';
import { AuthToken } from './AuthToken.js';
import { Listing } from './Listing.js';
import { KbVersion } from './KbVersion.js';
import { KbFile } from './KbFile.js';
import { KbVersionLog } from './KbVersionLog.js';

export const entities = [User, AuthToken, Listing, KbVersion, KbFile, KbVersionLog];
export { AuthToken, User };
export { Listing, KbVersion, KbFile, KbVersionLog };
