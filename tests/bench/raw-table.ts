import type Database from "better-sqlite3";

// The benches' bare database: the migrated schema with one customer, site and chiller, and
// `count` points (ids 1..count) for raw readings to go to. No point map, no gateway.
export function seedRawPoints(sqlite: Database.Database, count: number): void {
  sqlite.exec(
    "insert into organizations (id, name, kind) values ('o','o','customer'); insert into sites (id,name,organization_id,kind,address,time_zone) values ('s','s','o','k','a','UTC'); insert into equipment (id, site_id, tag, name, kind) values ('e','s','T','n','chiller')",
  );
  const insertPoint = sqlite.prepare("insert into points (equipment_id, key, quantity, unit, brick_class) values ('e', ?, 'compressor_power', 'kW', 'x')");
  sqlite.transaction(() => {
    for (let i = 0; i < count; i++) insertPoint.run(`k${i}`);
  })();
}
