// Every migration, in order. Migrations are committed and never edited after they land.
import { Users1764600000000 } from './1764600000000-Users.js';
import { AuthTokens1764610000000 } from './1764610000000-AuthTokens.js';
import { Listings1764700000000 } from './1764700000000-Listings.js';
import { Market1764800000000 } from './1764800000000-Market.js';

export const migrations = [Users1764600000000, AuthTokens1764610000000, Listings1764700000000, Market1764800000000];
