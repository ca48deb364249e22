import type { EquipmentDto } from "@/db/queries/sites";
import { isQuantityKey, quantities } from "@/lib/quantities";
import { displayUnit, type UnitSystem } from "@/lib/units";

const kindLabel: Record<string, string> = {
  chiller: "Chiller",
  cooling_tower: "Cooling tower",
  pump: "Pump",
  air_handler: "Air handler",
  weather_station: "Weather station",
};

function describe(e: EquipmentDto): string {
  const parts = [kindLabel[e.kind] ?? e.kind];
  if (e.capacityTons) parts.push(`${e.capacityTons} tons`);
  if (e.refrigerant) parts.push(e.refrigerant);
  if (e.serves) parts.push(`serves ${e.serves}`);
  return parts.join(" · ");
}

export function EquipmentTable({ equipment, unitSystem }: { equipment: EquipmentDto[]; unitSystem: UnitSystem }) {
  return (
    <div className="flex flex-col gap-4">
      {equipment.map((e) => (
        <section key={e.id} aria-labelledby={`eq-${e.id}`} className="rounded-lg border border-line bg-panel" data-testid="equipment">
          <header className="flex flex-wrap items-baseline gap-x-3 border-b border-line px-4 py-2">
            <h2 id={`eq-${e.id}`} className="font-semibold">
              {e.tag} <span className="font-normal text-muted">{e.name}</span>
            </h2>
            <p className="text-sm text-muted">{describe(e)}</p>
          </header>
          <div className="overflow-x-auto">
            <table className="w-full text-sm">
              <thead className="text-left text-muted">
                <tr>
                  <th scope="col" className="px-4 py-1.5 font-normal">
                    Point
                  </th>
                  <th scope="col" className="px-4 py-1.5 font-normal">
                    Unit
                  </th>
                  <th scope="col" className="hidden px-4 py-1.5 font-normal sm:table-cell">
                    Brick class
                  </th>
                  <th scope="col" className="hidden px-4 py-1.5 text-right font-normal sm:table-cell">
                    Expected every
                  </th>
                </tr>
              </thead>
              <tbody>
                {e.points.map((p) => {
                  const q = isQuantityKey(p.quantity) ? quantities[p.quantity] : undefined;
                  return (
                    <tr key={p.id} className="border-t border-line/60">
                      <th scope="row" className="px-4 py-1.5 text-left font-normal">
                        {q?.label ?? p.key}
                      </th>
                      <td className="px-4 py-1.5 text-muted">{q ? displayUnit(q.measure, unitSystem) || "—" : p.unit}</td>
                      <td className="hidden px-4 py-1.5 font-mono text-xs text-muted sm:table-cell">{p.brickClass}</td>
                      <td className="hidden px-4 py-1.5 text-right text-muted sm:table-cell">{p.expectedIntervalS} s</td>
                    </tr>
                  );
                })}
              </tbody>
            </table>
          </div>
        </section>
      ))}
    </div>
  );
}
