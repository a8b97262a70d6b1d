import { useForm } from "react-hook-form";
import { Field, inputProps } from "~/components/Field";
import type { ExposureResult } from "~/lib/astro/exposure";
import { BANDS } from "~/lib/astro/bands";
import { LiveStatusLine, TelescopePicker } from "./LiveStatus";
import { compact, issuesByField, useLiveApi, type SkyTelescope } from "./live";
import { grouped as fmt } from "~/lib/format";

export type ExposureForm = {
  /** a telescope id (its aperture and obstruction), or "custom" for the two fields below */
  telescopeId: string;
  band: string;
  magnitude: string;
  mode: "snr" | "time";
  snr: string;
  exposureSeconds: string;
  airmass: string;
  seeingArcsec: string;
  moonCategory: string;
  telescope: { apertureM: string; centralObstruction: string };
  instrument: { throughput: string; pixelScaleArcsec: string; readNoiseE: string; darkEPerPixelPerS: string; fullWellE: string };
};

const NAMES = {
  telescopeId: "Telescope",
  band: "Band",
  magnitude: "Magnitude",
  snr: "Target SNR",
  exposureSeconds: "Exposure",
  airmass: "Air mass",
  seeingArcsec: "Seeing",
  moonCategory: "Moon",
  "telescope.apertureM": "Aperture",
  "telescope.centralObstruction": "Central obstruction",
  "instrument.throughput": "Throughput",
  "instrument.pixelScaleArcsec": "Pixel scale",
  "instrument.readNoiseE": "Read noise",
  "instrument.darkEPerPixelPerS": "Dark current",
  "instrument.fullWellE": "Full well",
} as const;
type FieldName = keyof typeof NAMES;

export type ExposureAnswer = ExposureResult & { zeroPointPhotons: number };

/** The API body for the form's values: exactly one of snr / exposureSeconds, the telescope by id or by its two numbers. */
export function exposureRequest(v: ExposureForm) {
  const { mode, telescopeId, telescope, ...rest } = v;
  const body = {
    ...rest,
    snr: mode === "snr" ? rest.snr : "",
    exposureSeconds: mode === "time" ? rest.exposureSeconds : "",
    ...(telescopeId === "custom" ? { telescope } : { telescopeId }),
  };
  return { method: "POST" as const, url: "/api/v1/exposure", body: compact(body) };
}

export function ExposureTool({ defaults, initial, telescopes }: { defaults: ExposureForm; initial: ExposureAnswer; telescopes: SkyTelescope[] }) {
  const form = useForm<ExposureForm>({ defaultValues: defaults });
  const values = form.watch();
  const mode = values.mode;
  const live = useLiveApi<ExposureAnswer>(exposureRequest(values), initial);
  // "telescope" (nothing given) belongs to the picker
  const { byField, other } = issuesByField(live.issues, NAMES, (p) => (p === "telescope" ? "telescopeId" : p));
  const r = live.result;
  const custom = values.telescopeId === "custom";
  const err = (k: FieldName): string | undefined => byField[k];
  const input = (k: FieldName) => ({ ...inputProps(`exp-${k}`, err(k)), ...form.register(k) });
  const scope = (k: "telescope.apertureM" | "telescope.centralObstruction") => ({ ...input(k), readOnly: !custom, className: custom ? "input" : "input bg-slate-100 text-slate-600" });
  const select = (k: FieldName) => ({ id: `exp-${k}`, "aria-invalid": err(k) ? true : undefined, ...form.register(k) });
  const pick = (id: string) => {
    const t = telescopes.find((x) => String(x.id) === id);
    form.setValue("telescopeId", id);
    if (t) {
      form.setValue("telescope.apertureM", String(t.apertureM));
      form.setValue("telescope.centralObstruction", String(t.centralObstruction));
    }
  };
  const total = r.noise.source + r.noise.sky + r.noise.dark + r.noise.read;

  return (
    <section className="card space-y-6" aria-labelledby="exp-title">
      <div>
        <h2 id="exp-title">Exposure time and signal-to-noise</h2>
        <p className="text-sm text-slate-600">
          The CCD equation (Howell, <i>Handbook of CCD Astronomy</i>; Merline &amp; Howell 1995), SNR = N* / √(N* + n<sub>pix</sub>(N<sub>sky</sub> + N<sub>dark</sub> + RN²)), with zero points of
          Bessell, Castelli &amp; Plez (1998), extinction k·X, and an aperture of radius 1 × FWHM of the seeing.
        </p>
      </div>
      <form className="grid grid-cols-1 gap-4 sm:grid-cols-2 md:grid-cols-4 lg:grid-cols-7" noValidate onSubmit={(e) => e.preventDefault()}>
        <TelescopePicker id="exp-telescopeId" value={values.telescopeId} onChange={pick} telescopes={telescopes} error={err("telescopeId")} customLabel="Custom telescope (aperture below)" />
        <Field label="Band" id="exp-band" error={err("band")}>
          <select {...select("band")} className="input">{BANDS.map((b) => <option key={b}>{b}</option>)}</select>
        </Field>
        <Field label="Magnitude" id="exp-magnitude" error={err("magnitude")}><input inputMode="decimal" {...input("magnitude")} /></Field>
        <Field label="Solve for" id="exp-mode">
          <select
            id="exp-mode"
            className="input"
            {...form.register("mode", {
              onChange: (e) => {
                // keep exactly one of the two filled, seeded with the last answer
                if (e.target.value === "time") {
                  form.setValue("exposureSeconds", String(Math.round(r.exposureSeconds)));
                  form.setValue("snr", "");
                } else {
                  form.setValue("snr", String(Math.round(r.snr)));
                  form.setValue("exposureSeconds", "");
                }
              },
            })}
          >
            <option value="snr">time for an SNR</option>
            <option value="time">SNR for a time</option>
          </select>
        </Field>
        {mode === "snr" ? (
          <Field label="Target SNR" id="exp-snr" error={err("snr")}><input inputMode="decimal" {...input("snr")} /></Field>
        ) : (
          <Field label="Exposure (s)" id="exp-exposureSeconds" error={err("exposureSeconds")}><input inputMode="decimal" {...input("exposureSeconds")} /></Field>
        )}
        <Field label="Air mass" id="exp-airmass" error={err("airmass")}><input inputMode="decimal" {...input("airmass")} /></Field>
        <Field label="Seeing FWHM (″)" id="exp-seeingArcsec" error={err("seeingArcsec")}><input inputMode="decimal" {...input("seeingArcsec")} /></Field>
        <Field label="Moon" id="exp-moonCategory" error={err("moonCategory")}>
          <select {...select("moonCategory")} className="input"><option>dark</option><option>grey</option><option>bright</option></select>
        </Field>
        <Field label="Aperture (m)" id="exp-telescope.apertureM" error={err("telescope.apertureM")}><input inputMode="decimal" {...scope("telescope.apertureM")} /></Field>
        <Field label="Central obstruction" id="exp-telescope.centralObstruction" error={err("telescope.centralObstruction")} hint="fraction of the diameter"><input inputMode="decimal" {...scope("telescope.centralObstruction")} /></Field>
        <Field label="Throughput (0–1)" id="exp-instrument.throughput" error={err("instrument.throughput")}><input inputMode="decimal" {...input("instrument.throughput")} /></Field>
        <Field label="Pixel scale (″)" id="exp-instrument.pixelScaleArcsec" error={err("instrument.pixelScaleArcsec")}><input inputMode="decimal" {...input("instrument.pixelScaleArcsec")} /></Field>
        <Field label="Read noise (e⁻)" id="exp-instrument.readNoiseE" error={err("instrument.readNoiseE")}><input inputMode="decimal" {...input("instrument.readNoiseE")} /></Field>
        <Field label="Dark (e⁻/px/s)" id="exp-instrument.darkEPerPixelPerS" error={err("instrument.darkEPerPixelPerS")}><input inputMode="decimal" {...input("instrument.darkEPerPixelPerS")} /></Field>
        <Field label="Full well (e⁻)" id="exp-instrument.fullWellE" error={err("instrument.fullWellE")}><input inputMode="decimal" {...input("instrument.fullWellE")} /></Field>
        <LiveStatusLine status={live.status} failure={live.failure} other={other} testId="exp-status" />
      </form>

      <div className="grid gap-6 md:grid-cols-2">
        <table className="table-base">
          <tbody>
            <tr><th>Exposure</th><td className="text-lg font-semibold" data-testid="exp-exposure">{fmt(r.exposureSeconds, 1)} s</td></tr>
            <tr><th>Signal-to-noise</th><td className="text-lg font-semibold" data-testid="exp-snr">{fmt(r.snr, 1)}</td></tr>
            <tr><th>Source in aperture</th><td>{fmt(r.sourceElectrons, 0)} e⁻ ({fmt(r.apertureFraction * 100, 1)} % of the PSF, radius {fmt(r.apertureRadiusArcsec, 2)}″)</td></tr>
            <tr><th>Pixels in aperture</th><td>{fmt(r.pixels, 1)}</td></tr>
            <tr><th>Sky per pixel</th><td>{fmt(r.skyElectronsPerPixel, 1)} e⁻ ({fmt(r.skyMagPerArcsec2, 2)} mag/arcsec²)</td></tr>
            <tr><th>Dark per pixel</th><td>{fmt(r.darkElectronsPerPixel, 2)} e⁻</td></tr>
            <tr><th>Read noise</th><td>{fmt(r.readNoiseE, 1)} e⁻ per pixel</td></tr>
            <tr><th>Peak pixel</th><td className={r.saturated ? "font-semibold text-red-700" : ""}>{fmt(r.peakPixelElectrons, 0)} e⁻ of {fmt(r.fullWellE, 0)} {r.saturated ? "— saturated: shorten the exposure and take more" : ""}</td></tr>
            <tr><th>Zero point</th><td>{fmt(r.zeroPointPhotons, 0)} photons s⁻¹ cm⁻² at magnitude 0; k = {fmt(r.extinctionMagPerAirmass, 2)} mag/air mass</td></tr>
          </tbody>
        </table>
        <div>
          <h3 className="mb-2 text-sm font-semibold text-night-900">Noise budget (variance, e⁻²) — {r.regime}</h3>
          <table className="table-base">
            <thead><tr><th>Term</th><th>Variance</th><th>Share</th><th /></tr></thead>
            <tbody>
              {([
                ["Source", r.noise.source],
                ["Sky", r.noise.sky],
                ["Dark", r.noise.dark],
                ["Read noise", r.noise.read],
              ] as const).map(([name, v]) => (
                <tr key={name}>
                  <td>{name}</td>
                  <td>{fmt(v, 0)}</td>
                  <td>{fmt((100 * v) / total, 1)} %</td>
                  <td className="w-1/3"><div className="h-2 rounded bg-night-700" style={{ width: `${(100 * v) / total}%` }} /></td>
                </tr>
              ))}
              <tr><td className="font-semibold">Total</td><td className="font-semibold">{fmt(total, 0)}</td><td>noise {fmt(Math.sqrt(total), 1)} e⁻</td><td /></tr>
            </tbody>
          </table>
        </div>
      </div>
    </section>
  );
}
