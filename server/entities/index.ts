// Every TypeORM entity, listed explicitly (globs do not work under the test runner's module loader).
import { User } from './User.js';
import { AuthToken } from './AuthToken.js';
import { Listing } from './Listing.js';
import { KbVersion } from './KbVersion.js';
import { KbFile } from './KbFile.js';
import { KbVersionLog } from './KbVersionLog.js';
import { Plan } from './Plan.js';
import { Subscription } from './Subscription.js';
import { ApiKey } from './ApiKey.js';
import { Invoice } from './Invoice.js';
import { WebhookEvent } from './WebhookEvent.js';

export const entities = [User, AuthToken, Listing, KbVersion, KbFile, KbVersionLog, Plan, Subscription, ApiKey, Invoice, WebhookEvent];
export { AuthToken, User };
export { Listing, KbVersion, KbFile, KbVersionLog };
export { Plan, Subscription, ApiKey, Invoice, WebhookEvent };
