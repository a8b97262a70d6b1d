import { Form, useNavigation } from "react-router";
import { telescopeSchema } from "~/lib/schemas/office";
import { FormError, NumberField, OfficeFields, TextField, useOfficeForm, type FormResult } from "./fields";
import { valueTexts } from "~/lib/forms";

export interface TelescopeValues {
  name: string;
  siteName: string;
  latitudeDeg: number | string;
  longitudeDeg: number | string;
  elevationM: number | string;
  timeZone: string;
  apertureM: number | string;
  centralObstruction: number | string;
}

export function TelescopeForm({
  intent,
  initial,
  result,
  timeZones,
  submitLabel,
}: {
  intent: string;
  initial?: Partial<TelescopeValues>;
  result?: FormResult;
  timeZones: string[];
  submitLabel: string;
}) {
  const { errors, onSubmit, register } = useOfficeForm(telescopeSchema, result?.errors);
  const navigation = useNavigation();
  const busy = navigation.state === "submitting" && navigation.formData?.get("intent") === intent;
  const v = { ...initial, ...valueTexts(result?.values) } as Partial<Record<keyof TelescopeValues, string | number>>;
  const p = `telescope-${intent}`;
  return (
    <Form method="post" noValidate onSubmit={onSubmit} className="space-y-4" aria-label={submitLabel}>
      <OfficeFields value={register}>
      <FormError error={errors.form} />
      <div className="grid gap-4 md:grid-cols-2">
        <TextField prefix={p} name="name" label="Telescope" defaultValue={v.name} error={errors.name} placeholder="KRO 2.4 m" />
        <TextField prefix={p} name="siteName" label="Site" defaultValue={v.siteName} error={errors.siteName} placeholder="Kestrel Ridge" />
      </div>
      <div className="grid gap-4 md:grid-cols-3">
        <NumberField prefix={p} name="latitudeDeg" label="Latitude" unit="° N" defaultValue={v.latitudeDeg} error={errors.latitudeDeg} hint="North positive, south negative (−90 to 90)" />
        <NumberField prefix={p} name="longitudeDeg" label="Longitude" unit="° E" defaultValue={v.longitudeDeg} error={errors.longitudeDeg} hint="East positive, west negative (−180 to 180)" />
        <NumberField prefix={p} name="elevationM" label="Elevation" unit="m" defaultValue={v.elevationM} error={errors.elevationM} hint="Above sea level" />
      </div>
      <div className="grid gap-4 md:grid-cols-3">
        <TextField
          prefix={p}
          name="timeZone"
          label="Time zone (IANA)"
          list="iana-time-zones"
          defaultValue={v.timeZone}
          error={errors.timeZone}
          placeholder="America/Denver"
          hint="The site's civil time; deadlines are shown in it"
        />
        <NumberField prefix={p} name="apertureM" label="Aperture" unit="m" defaultValue={v.apertureM} error={errors.apertureM} hint="Diameter of the primary mirror" />
        <NumberField
          prefix={p}
          name="centralObstruction"
          label="Central obstruction"
          unit="× diameter"
          defaultValue={v.centralObstruction}
          error={errors.centralObstruction}
          hint="Secondary's diameter as a fraction of the aperture (0–0.9)"
        />
      </div>
      <datalist id="iana-time-zones">
        {timeZones.map((zone) => (
          <option key={zone} value={zone} />
        ))}
      </datalist>
      <button type="submit" name="intent" value={intent} className="btn" disabled={busy}>
        {busy ? "Saving…" : submitLabel}
      </button>
      </OfficeFields>
    </Form>
  );
}
