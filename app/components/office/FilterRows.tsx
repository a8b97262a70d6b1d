import { useActionData, useFetcher } from "react-router";
import { filterSchema } from "~/lib/schemas/office";
import { fieldId, resultFor, useOfficeForm, type FormResult } from "./fields";
import { valueTexts } from "~/lib/forms";

export const filterColumns = [
  { name: "band", label: "Band", unit: "", width: "w-20" },
  { name: "zeroPointPhotons", label: "Zero point", unit: "photons s⁻¹ cm⁻² at mag 0", width: "w-32" },
  { name: "extinctionMagPerAirmass", label: "Extinction", unit: "mag/airmass", width: "w-24" },
  { name: "skyDarkMag", label: "Dark sky", unit: "mag/arcsec²", width: "w-24" },
  { name: "skyGreyMag", label: "Grey sky", unit: "mag/arcsec²", width: "w-24" },
  { name: "skyBrightMag", label: "Bright sky", unit: "mag/arcsec²", width: "w-24" },
] as const;

type FilterValues = Partial<Record<(typeof filterColumns)[number]["name"], string | number>>;

/** One editable row of the filter table; its inputs belong to a form in the last cell. */
export function FilterRow({ filter, isNew = false }: { filter?: FilterValues & { id: number }; isNew?: boolean }) {
  const fetcher = useFetcher<FormResult>();
  const routeData = useActionData();
  const posted = fetcher.data ?? (isNew ? resultFor(routeData, "createFilter") : resultFor(routeData, "updateFilter", filter!.id) ?? resultFor(routeData, "deleteFilter", filter!.id));
  const result = posted && !posted.ok ? posted : undefined;
  const { errors, onSubmit, register } = useOfficeForm(filterSchema, result?.errors, fetcher.submit);
  const formId = isNew ? "filter-new" : `filter-${filter!.id}`;
  const values = { ...filter, ...valueTexts(result?.values) } as Record<string, string | number | undefined>;
  const busy = fetcher.state !== "idle";
  return (
    <tr className={isNew ? "bg-night-50" : undefined}>
      {filterColumns.map((c) => {
        const id = fieldId(formId, c.name);
        const error = errors[c.name];
        return (
          <td key={c.name}>
            <label htmlFor={id} className="sr-only">
              {c.label}
              {c.unit ? ` (${c.unit})` : ""}
              {isNew ? " of the new filter" : ` of ${filter?.band}`}
            </label>
            <input
              id={id}
              {...register(c.name)}
              form={formId}
              inputMode={c.name === "band" ? undefined : "decimal"}
              autoComplete="off"
              defaultValue={values[c.name] === undefined ? "" : String(values[c.name])}
              placeholder={isNew ? (c.name === "band" ? "V" : "") : undefined}
              className={`input mt-0 px-2 py-1 text-sm ${c.width} ${c.name === "band" ? "" : "text-right tabular-nums"}`}
              aria-invalid={error ? true : undefined}
              aria-describedby={error ? `${id}-error` : undefined}
            />
            {error ? (
              <p id={`${id}-error`} role="alert" className="mt-1 max-w-40 text-xs text-red-700">
                {error}
              </p>
            ) : null}
          </td>
        );
      })}
      <td className="whitespace-nowrap">
        <fetcher.Form method="post" id={formId} noValidate onSubmit={onSubmit} className="flex gap-2">
          {filter ? <input type="hidden" name="filterId" value={filter.id} /> : null}
          <button type="submit" name="intent" value={isNew ? "createFilter" : "updateFilter"} className="btn px-3 py-1" disabled={busy}>
            {isNew ? "Add" : "Save"}
          </button>
          {isNew ? null : (
            <button
              type="submit"
              name="intent"
              value="deleteFilter"
              data-no-check=""
              className="btn-quiet border-red-300 px-2 py-1 text-red-800 hover:bg-red-50"
              disabled={busy}
              onClick={(event) => {
                if (!window.confirm(`Delete the ${filter?.band} filter?`)) event.preventDefault();
              }}
            >
              Delete
            </button>
          )}
        </fetcher.Form>
        {/* a bad filterId is the page's, not a field's: the row says it */}
        {errors.form ?? errors.filterId ? (
          <p role="alert" className="mt-1 max-w-56 text-xs whitespace-normal text-red-700">
            {errors.form ?? errors.filterId}
          </p>
        ) : null}
        {fetcher.data?.ok && fetcher.state === "idle" && !isNew ? <p role="status" className="mt-1 text-xs text-emerald-700">Saved</p> : null}
      </td>
    </tr>
  );
}
