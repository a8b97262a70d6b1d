import { Form } from "react-router";

/** A POST with one intent, after the browser asks once. */
export function DeleteButton({ intent, label, question, error }: { intent: string; label: string; question: string; error?: string }) {
  return (
    <Form
      method="post"
      onSubmit={(event) => {
        if (!window.confirm(question)) event.preventDefault();
      }}
      className="space-y-2"
    >
      <button type="submit" name="intent" value={intent} className="btn-quiet border-red-300 text-red-800 hover:bg-red-50">
        {label}
      </button>
      {error ? (
        <p role="alert" className="text-sm text-red-700">
          {error}
        </p>
      ) : null}
    </Form>
  );
}
