import { useFetcher } from "react-router";
import type { ActionFailure } from "~/lib/forms";

/** A table row's delete button: posts `intent=delete` with the row's id after the browser asks once. */
export function DeleteButton({ idField, id, question, label }: { idField: string; id: number; question: string; label?: string }) {
  const fetcher = useFetcher<ActionFailure | { ok: true }>();
  const error = fetcher.data && !fetcher.data.ok ? Object.values(fetcher.data.errors)[0] : null;
  return (
    <fetcher.Form
      method="post"
      className="inline"
      onSubmit={(e) => {
        if (!confirm(question)) e.preventDefault();
      }}
    >
      <input type="hidden" name="intent" value="delete" />
      <input type="hidden" name={idField} value={id} />
      <button type="submit" className="btn-quiet" aria-label={label}>Delete</button>
      {error ? <span role="alert" className="ml-1 text-xs text-red-700">{error}</span> : null}
    </fetcher.Form>
  );
}
