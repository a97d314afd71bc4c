// The stage input vocabulary belongs to the engine (lib/calc/input.ts); the routes and forms parse with the same schemas.
export * from '../calc/input';
