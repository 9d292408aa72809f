import { Card } from "~/components/ui/card";
import { formatThreshold, type ZoneTableData } from "~/lib/zone-table";

export function ZoneTable({ title, table }: { title: string; table: ZoneTableData }) {
  const show = (v: number) => formatThreshold(v, table.unit);
  return (
    <Card>
      <h2 className="font-semibold">{title}</h2>
      <p className="num text-xs text-ink-soft">
        Threshold {show(table.threshold)} · {table.source}
      </p>
      <table className="num mt-2 w-full text-sm">
        <tbody>
          {table.rows.map((r, i) => (
            <tr key={r.key} className="border-t border-line/60">
              <td className="py-1">
                <span className="mr-2 inline-block h-3 w-3 rounded-sm align-middle" style={{ background: `var(--color-level-${Math.min(7, i + 1)})` }} />
                {r.key} {r.name}
              </td>
              <td className="py-1 text-right">{r.hi === null ? `above ${show(r.lo)}` : i === 0 ? `up to ${show(r.hi)}` : `${show(r.lo)} – ${show(r.hi)}`}</td>
            </tr>
          ))}
        </tbody>
      </table>
    </Card>
  );
}
