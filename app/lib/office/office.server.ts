// The observatory office's set-up: telescopes, their instruments and filters, and calls, one
// module each (./telescopes.server, ./instruments.server, ./filters.server, ./calls.server).
// Every change and its audit entry are one transaction; refusals are Refusal with the field
// the message belongs to, never a database error surfacing as a 500.

export { createTelescope, deleteTelescope, getTelescope, listTelescopes, observatoryTimeZone, updateTelescope } from "./telescopes.server";
export { createInstrument, deleteInstrument, getInstrument, plainInstrument, updateInstrument } from "./instruments.server";
export { createFilter, deleteFilter, updateFilter } from "./filters.server";
export { createCall, getCall, listCalls, listPublicCalls, updateCall } from "./calls.server";
