import { useState } from "react";
import type { Toast as ToastData } from "~/lib/forms";

/**
 * The one-time note a redirect carried (see `.server/flash.ts`), at the foot of the screen so it never covers the
 * header's controls. A live region so screen readers read it without
 * moving focus; it stays until dismissed or the next note replaces it, because a note that vanishes on a timer is
 * gone before some people have read it.
 */
export function Toast({ toast }: { toast: ToastData | null }) {
  // Each new note shows until dismissed; dismissing hides that note only.
  const [dismissed, setDismissed] = useState<ToastData | null>(null);
  const shown = toast && toast !== dismissed ? toast : null;
  return (
    <div
      className="pointer-events-none fixed inset-x-0 bottom-3 z-50 flex justify-center px-4"
      role="status"
      aria-live="polite"
      data-testid="toast"
    >
      {shown && (
        <div
          className={`pointer-events-auto flex max-w-xl items-start gap-3 rounded-lg border px-4 py-3 text-sm shadow-md ${
            shown.tone === "error" ? "border-brick/40 bg-white text-brick" : "border-teal/40 bg-white text-teal-dark"
          }`}
        >
          <p className="flex-1">{shown.message}</p>
          <button
            type="button"
            className="text-ink-soft hover:text-ink"
            onClick={() => setDismissed(toast)}
            aria-label="Dismiss"
          >
            ×
          </button>
        </div>
      )}
    </div>
  );
}
