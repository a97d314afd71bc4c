// How much one report may hold. A 64-stage report draws in well under its time budget on a small server
// (measured: about 18 s of one core), so 64 is also the cap on stages per project (lib/stages/limits.ts).
export const MAX_REPORT_STAGES = 64;
