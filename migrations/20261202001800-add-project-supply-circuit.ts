import { DataTypes, type QueryInterface } from 'sequelize';

type Ctx = { context: QueryInterface };

// The project's supply as a circuit (mains winding, rectifier, reservoir, filter sections; lib/validation/supply.ts).
// NULL keeps the older resistor ladder behind a fixed raw B+ (projects.supply), which still works.
export async function up({ context: qi }: Ctx) {
  await qi.addColumn('projects', 'supply_circuit', { type: DataTypes.JSONB, allowNull: true });
}

export async function down({ context: qi }: Ctx) {
  await qi.removeColumn('projects', 'supply_circuit');
}
