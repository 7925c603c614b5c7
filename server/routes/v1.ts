// /api/v1: the key-authenticated query API (see server/v1/router.ts).
export { v1Router } from '../v1/router.js';
