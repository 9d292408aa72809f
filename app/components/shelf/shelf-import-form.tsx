/** The shelf's import of a session file; the shelf route's action reads and checks it. */
import { buttonClass } from "~/components/ui/button";
import { Card } from "~/components/ui/card";
import type { ShelfFetcher } from "./shelf-session-card";

export function ImportForm({ fetcher }: { fetcher: ShelfFetcher }) {
  return (
    <Card className="mt-8 max-w-xl">
      <h2 className="font-semibold">Import sessions</h2>
      <p className="mt-1 text-sm text-ink-soft">
        A Pacewright session file (JSON, as made by “Export all”). If any session in it is not valid, nothing is
        imported.
      </p>
      <fetcher.Form method="post" encType="multipart/form-data" className="mt-3 flex flex-wrap items-center gap-3">
        <input type="hidden" name="intent" value="import" />
        <label className="sr-only" htmlFor="import-file">
          Session file
        </label>
        <input id="import-file" type="file" name="file" accept="application/json,.json" className="text-sm" />
        <button type="submit" className={buttonClass("secondary")}>
          Import
        </button>
      </fetcher.Form>
    </Card>
  );
}
