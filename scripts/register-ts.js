// Lets Node run the TypeScript sources directly (bench, scripts): `node --import ./scripts/register-ts.js file.ts`.
// Imports written with a `.js` suffix resolve to the `.ts` file beside them, as tsc does.
import { register } from 'node:module';

register('./ts-hooks.js', import.meta.url);
