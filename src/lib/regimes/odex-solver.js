// Re-export of package odex. Kept as plain JavaScript beside odex-solver.d.ts because the package
// ships TypeScript source that does not compile under this project's strict settings; the .d.ts
// declares the parts flow.ts uses, so the compiler never opens the package's own .ts file.
export { Solver, Outcome } from 'odex';
