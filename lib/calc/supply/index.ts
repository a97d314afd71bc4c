// The supply from the mains winding to the last node (pure: no I/O). See lib/calc/README.md.
export { solveSupply, prepareSupply, solvePrepared, supplyNodeVoltages, DEFAULT_STEPS, DEFAULT_VARIATION, DEFAULT_SUPPLY_DERATING } from './solve';
export type { PreparedSupply } from './solve';
export { supplyNetlist } from './spice';
export type { SupplyNetlistOptions } from './spice';
export { SILICON_DIODES, VACUUM_RECTIFIERS, siliconDiode, vacuumRectifier, vacuumPerveance, THERMAL_VOLTAGE_27C } from './rectifiers';
export type { SiliconDiode, VacuumRectifier } from './rectifiers';
export type * from './types';
export { circuitNodes, ladderToCircuit } from './ladder';
export type { CircuitNode } from './ladder';
