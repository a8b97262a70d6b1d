import { Form, useNavigation } from "react-router";
import { instrumentSchema } from "~/lib/schemas/office";
import { FormError, NumberField, OfficeFields, TextField, useOfficeForm, type FormResult } from "./fields";
import { valueTexts } from "~/lib/forms";

export const instrumentFields = [
  { name: "pixelScaleArcsec", label: "Pixel scale", unit: "″/pixel", hint: "On the sky, per (binned) pixel" },
  { name: "readNoiseE", label: "Read noise", unit: "e⁻ rms", hint: "Per pixel per read" },
  { name: "darkEPerPixelPerS", label: "Dark current", unit: "e⁻/pixel/s", hint: "At operating temperature" },
  { name: "gainEPerAdu", label: "Gain", unit: "e⁻/ADU" },
  { name: "fullWellE", label: "Full well", unit: "e⁻", hint: "Or the linearity limit, if lower" },
  { name: "throughput", label: "Throughput", unit: "0–1", hint: "Optics, instrument and detector QE, end to end" },
  { name: "readoutSeconds", label: "Readout overhead", unit: "s", hint: "Per frame" },
  { name: "acquisitionSeconds", label: "Acquisition overhead", unit: "s", hint: "Slew, acquisition and set-up, per visit" },
  { name: "astrometricFloorMas", label: "Systematic astrometric floor", unit: "mas", hint: "Added in quadrature per epoch" },
] as const;

export type InstrumentValues = { name: string } & Record<(typeof instrumentFields)[number]["name"], number | string>;

export function InstrumentForm({
  intent,
  initial,
  result,
  submitLabel,
}: {
  intent: string;
  initial?: Partial<InstrumentValues>;
  result?: FormResult;
  submitLabel: string;
}) {
  const { errors, onSubmit, register } = useOfficeForm(instrumentSchema, result?.errors);
  const navigation = useNavigation();
  const busy = navigation.state === "submitting" && navigation.formData?.get("intent") === intent;
  const v = { ...initial, ...valueTexts(result?.values) } as Record<string, string | number | undefined>;
  const p = `instrument-${intent}`;
  return (
    <Form method="post" noValidate onSubmit={onSubmit} className="space-y-4" aria-label={submitLabel}>
      <OfficeFields value={register}>
      <FormError error={errors.form} />
      <TextField prefix={p} name="name" label="Instrument" defaultValue={v.name} error={errors.name} placeholder="Ridge Imager 4K" className="max-w-md" />
      <div className="grid gap-4 sm:grid-cols-2 lg:grid-cols-3">
        {instrumentFields.map((f) => (
          <NumberField key={f.name} prefix={p} name={f.name} label={f.label} unit={f.unit} hint={"hint" in f ? f.hint : undefined} defaultValue={v[f.name]} error={errors[f.name]} />
        ))}
      </div>
      <button type="submit" name="intent" value={intent} className="btn" disabled={busy}>
        {busy ? "Saving…" : submitLabel}
      </button>
      </OfficeFields>
    </Form>
  );
}
