import { Link } from "react-router";
import { Card } from "~/components/ui/card";
import { formatThreshold, type BandTableData } from "~/lib/band-table";

/** One band set for one threshold: shade, name, range in the athlete's unit, and what the band is for. */
export function BandTable({ table, title }: { table: BandTableData; title?: string }) {
  return (
    <Card>
      <h2 className="font-semibold">{title ?? table.title}</h2>
      <p className="num text-xs text-ink-soft">
        Threshold {formatThreshold(table.threshold, table.unit)} ·{" "}
        {table.isDefault ? "Pacewright's default bands" : "your coach's bands"} ·{" "}
        <Link to="/bands/about" className="text-teal underline">
          about these bands
        </Link>
      </p>
      <table className="num mt-2 w-full text-sm" data-testid="band-table">
        <tbody>
          {table.rows.map((r) => (
            <tr key={r.name} className="border-t border-line/60 align-top">
              <td className="py-1 pr-2">
                <span
                  className="mr-2 inline-block h-3 w-3 rounded-sm align-middle"
                  style={{
                    background: r.shade,
                    boxShadow: r.aboveThreshold ? "inset 0 0 0 1.5px var(--color-brick)" : undefined,
                  }}
                  aria-hidden
                />
                <span className="font-medium">{r.name}</span>
                <span className="block text-xs text-ink-soft">{r.meaning}</span>
              </td>
              <td className="whitespace-nowrap py-1 text-right">{r.range}</td>
            </tr>
          ))}
        </tbody>
      </table>
    </Card>
  );
}
