// The office's records the science API reads: a telescope, an instrument with its filters.
import { Filter, Instrument, Telescope } from "~/models/index.server";

export type { Telescope };

export function telescopeById(id: number) {
  return Telescope.findByPk(id);
}

export function instrumentWithFilters(id: number) {
  return Instrument.findByPk(id, { include: [{ model: Filter, as: "filters" }] });
}
