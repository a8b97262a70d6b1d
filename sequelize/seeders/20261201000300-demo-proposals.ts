// Demo proposals of the invented Kestrel Ridge scenario: about thirty, from the demo users and a
// few more invented PIs, in every state, each with targets, observations, planned epochs for the
// astrometric ones, Co-Is and a generated science-case PDF.
//
// Dates: on the seeding day the 2027A call is open (deadline in the future) and 2027B has not
// opened yet, so neither can hold proposals that were reviewed or decided. Those live in a
// closed call 2026B (semester 2026-08-01 to 2027-01-31, deadline 2026-05-15) that this seeder
// adds: accepted, waitlisted and declined ones, and a few still in review (the committee's
// late-decided remainder of that semester's filler time; the one stretch of the calendar
// here). 2027A holds drafts, submitted and withdrawn proposals; 2027B two drafts started early.
//
// Cluster fields and their coordinates are invented; positions were chosen to be well placed
// from the site (latitude +38.9°) in the semester of their call. Idempotent: a proposal is
// found by its title and left alone when it exists.
import { createHash } from "node:crypto";
import { PDFDocument, StandardFonts, rgb } from "pdf-lib";
import type { Sequelize, Transaction } from "sequelize";
import { prepareSiteNights, targetNights, limitAltitude } from "~/lib/astro/visibility";
import { semesterOf } from "~/lib/astro/astrometry";
import { Call, CallOffer, Filter, Instrument, Observation, PlannedEpoch, Proposal, ProposalMember, StoredFile, Telescope, Target, User, AuditEntry } from "~/models/index.server";
import type { MoonCategory } from "~/lib/domain";

const morePis = [
  { email: "pi5@kestrel-ridge.example", name: "Mireille Oyelaran-Voss", institution: "Eskerfield University", member: true },
  { email: "pi6@kestrel-ridge.example", name: "Dario Fenwick-Sato", institution: "Pellham Astrophysical Laboratory", member: false },
  { email: "pi7@kestrel-ridge.example", name: "Agathe Lindqvist-Mbeki", institution: "Northwold College", member: true },
  { email: "pi8@kestrel-ridge.example", name: "Tobiah Rennick", institution: "Caddow School of Physics", member: false },
];

type T = { name: string; ra: number; dec: number; pmRa?: number; pmDec?: number; mag: number; band: string };
type O = {
  telescope: "2.4" | "1.0";
  band: string;
  snr?: number;
  exp?: number;
  frames: number;
  epochs: number;
  baseline?: number;
  reqPm?: number;
  moon: MoonCategory;
  airmass: number;
  seeing: number;
};
type Demo = {
  title: string;
  call: "2026B" | "2027A" | "2027B";
  status: "draft" | "submitted" | "in_review" | "accepted" | "waitlisted" | "declined" | "withdrawn";
  coded?: boolean;
  pi: string;
  cois: string[];
  category: string;
  abstract: string;
  multi?: string[];
  too?: boolean;
  targets: T[];
  obs: O;
  pages?: number;
};

// RA in degrees. 2027A (Feb–Jul) favours RA 8–17 h; 2026B (Aug–Jan) RA 20–4 h.
const demos: Demo[] = [
  // --- multi-epoch astrometry of invented cluster fields ---
  {
    title: "Proper motions in Kestrel Field 7: membership of a sparse old cluster",
    call: "2027A", status: "submitted", pi: "pi@kestrel-ridge.example", cois: ["pi3@kestrel-ridge.example", "reviewer4@kestrel-ridge.example"],
    category: "clusters-astrometry", multi: ["2027A", "2027B", "2028A", "2028B"],
    abstract: "We will measure relative proper motions of faint stars in Kestrel Field 7, a sparse cluster at about 1.1 kpc, to separate members from the field down to I = 19. Two epochs per semester over two years on the 2.4 m reach 2 mas/yr, enough to separate members from the field by their common motion.",
    targets: [
      { name: "Kestrel Field 7 centre", ra: 148.21, dec: 31.42, pmRa: -3.1, pmDec: -5.6, mag: 17.2, band: "I" },
      { name: "Kestrel Field 7 north", ra: 148.35, dec: 31.71, pmRa: -3.0, pmDec: -5.4, mag: 17.6, band: "I" },
    ],
    obs: { telescope: "2.4", band: "I", snr: 150, frames: 5, epochs: 2, baseline: 2, reqPm: 2, moon: "grey", airmass: 1.5, seeing: 1.0 },
  },
  {
    title: "A parallax ladder for the Ossel Cluster",
    call: "2027A", status: "submitted", pi: "pi2@kestrel-ridge.example", cois: ["pi@kestrel-ridge.example"],
    category: "clusters-astrometry", multi: ["2027A", "2027B", "2028A"],
    abstract: "Trigonometric parallaxes of the brightest giants in the Ossel Cluster, at an estimated 450 pc, tie its main-sequence fitting distance to a geometric one. We place epochs near the parallax-factor extremes of each season.",
    targets: [{ name: "Ossel Cluster core", ra: 171.6, dec: 22.9, pmRa: 6.2, pmDec: -11.4, mag: 14.1, band: "R" }],
    obs: { telescope: "2.4", band: "R", snr: 200, frames: 6, epochs: 2, baseline: 1.5, reqPm: 3, moon: "grey", airmass: 1.6, seeing: 1.0 },
  },
  {
    title: "Internal kinematics of the Brannock Field 2 association",
    call: "2027A", status: "draft", pi: "pi@kestrel-ridge.example", cois: ["pi4@kestrel-ridge.example", "h.okafor-strand@saltmere.example"],
    category: "clusters-astrometry", multi: ["2027A", "2027B", "2028A", "2028B"],
    abstract: "Brannock Field 2 is a young association whose expansion age is unknown. A two-year astrometric baseline with the 2.4 m gives proper motions for about 300 members and an expansion age to 15 %.",
    targets: [
      { name: "Brannock Field 2 A", ra: 201.3, dec: 18.4, pmRa: -1.8, pmDec: -2.2, mag: 16.4, band: "I" },
      { name: "Brannock Field 2 B", ra: 201.9, dec: 18.1, pmRa: -1.7, pmDec: -2.4, mag: 16.8, band: "I" },
      { name: "Brannock Field 2 C", ra: 202.4, dec: 18.6, pmRa: -1.9, pmDec: -2.1, mag: 17.1, band: "I" },
    ],
    obs: { telescope: "2.4", band: "I", snr: 120, frames: 4, epochs: 2, baseline: 2, reqPm: 1.5, moon: "dark", airmass: 1.5, seeing: 1.0 },
  },
  {
    title: "Runaway candidates around the Quillon Group",
    call: "2027A", status: "withdrawn", coded: true, pi: "pi5@kestrel-ridge.example", cois: ["pi2@kestrel-ridge.example"],
    category: "clusters-astrometry", multi: ["2027A", "2027B", "2028A"],
    abstract: "Stars ejected from the Quillon Group should move away from its centre at 20–40 km/s. We measure proper motions of twelve candidates over 18 months.",
    targets: [{ name: "Quillon Group field", ra: 225.8, dec: 35.2, pmRa: -4.4, pmDec: 1.2, mag: 15.3, band: "R" }],
    obs: { telescope: "2.4", band: "R", snr: 150, frames: 4, epochs: 2, baseline: 1.5, reqPm: 3, moon: "grey", airmass: 1.6, seeing: 1.1 },
  },
  {
    title: "Merrow Field 11: a tidal tail in proper-motion space",
    call: "2027B", status: "draft", pi: "pi7@kestrel-ridge.example", cois: [],
    category: "clusters-astrometry", multi: ["2027B", "2028A", "2028B"],
    abstract: "A draft for the 2027B call: the leading tidal tail of the Merrow Field 11 cluster should stand out in proper motion from the field. Started early, before the call opens.",
    targets: [{ name: "Merrow Field 11 tail", ra: 12.4, dec: 24.8, pmRa: 2.3, pmDec: -6.1, mag: 17.8, band: "I" }],
    obs: { telescope: "2.4", band: "I", snr: 100, frames: 5, epochs: 2, baseline: 1.5, reqPm: 3.5, moon: "dark", airmass: 1.5, seeing: 1.0 },
  },
  {
    title: "Harlan Drift 4 membership from a three-year baseline",
    call: "2026B", status: "accepted", coded: true, pi: "pi3@kestrel-ridge.example", cois: ["pi@kestrel-ridge.example", "pi6@kestrel-ridge.example"],
    category: "clusters-astrometry", multi: ["2026B", "2027A", "2027B"],
    abstract: "Harlan Drift 4 is a dissolving cluster at 700 pc. Proper motions from a three-year baseline give its membership and the velocity of its dissolution.",
    targets: [{ name: "Harlan Drift 4", ra: 34.7, dec: 28.3, pmRa: 8.8, pmDec: -4.9, mag: 16.2, band: "I" }],
    obs: { telescope: "2.4", band: "I", snr: 150, frames: 5, epochs: 2, baseline: 1.5, reqPm: 3, moon: "grey", airmass: 1.5, seeing: 1.0 },
  },
  {
    title: "Veymoor Field 3 white dwarfs: parallaxes for the cooling sequence",
    call: "2026B", status: "waitlisted", coded: true, pi: "pi4@kestrel-ridge.example", cois: ["pi7@kestrel-ridge.example"],
    category: "clusters-astrometry", multi: ["2026B", "2027A"],
    abstract: "Faint white dwarfs in Veymoor Field 3 need parallaxes to place them on the cooling sequence. The 2.4 m reaches them in dark time at SNR 80 per frame.",
    targets: [{ name: "Veymoor Field 3", ra: 352.1, dec: 21.6, pmRa: 41.0, pmDec: -18.5, mag: 18.4, band: "R" }],
    obs: { telescope: "2.4", band: "R", snr: 80, frames: 6, epochs: 2, baseline: 1, reqPm: 6, moon: "dark", airmass: 1.5, seeing: 1.0 },
  },
  {
    title: "Anselm Cluster: binaries from astrometric wobble",
    call: "2026B", status: "in_review", coded: true, pi: "pi6@kestrel-ridge.example", cois: ["pi5@kestrel-ridge.example"],
    category: "clusters-astrometry", multi: ["2026B", "2027A", "2027B"],
    abstract: "Unresolved binaries in the Anselm Cluster show as residuals from a five-parameter fit. Dense epochs over 18 months flag wobbles above 3 mas.",
    targets: [{ name: "Anselm Cluster", ra: 58.9, dec: 33.7, pmRa: 1.9, pmDec: -7.7, mag: 15.8, band: "I" }],
    obs: { telescope: "2.4", band: "I", snr: 180, frames: 5, epochs: 3, baseline: 1.5, reqPm: 2.5, moon: "grey", airmass: 1.5, seeing: 1.0 },
  },
  {
    title: "Calder Field 9 with the 1.0 m: bright-member proper motions",
    call: "2026B", status: "declined", coded: true, pi: "pi8@kestrel-ridge.example", cois: [],
    category: "clusters-astrometry", multi: ["2026B", "2027A"],
    abstract: "The bright members of Calder Field 9 are within reach of the 1.0 m. One year of epochs measures their bulk motion to 5 mas/yr.",
    targets: [{ name: "Calder Field 9", ra: 15.2, dec: 40.1, pmRa: -2.4, pmDec: -1.1, mag: 13.2, band: "V" }],
    obs: { telescope: "1.0", band: "V", snr: 150, frames: 4, epochs: 2, baseline: 1, reqPm: 10, moon: "grey", airmass: 1.6, seeing: 1.3 },
  },
  {
    title: "Tessaly Knot: the slowest cluster in the sky?",
    call: "2027A", status: "submitted", pi: "pi7@kestrel-ridge.example", cois: ["pi3@kestrel-ridge.example"],
    category: "clusters-astrometry", multi: ["2027A", "2027B", "2028A"],
    abstract: "The Tessaly Knot appears to share the Sun's motion to within 3 mas/yr. Three semesters of epochs test whether it is a true comoving group.",
    targets: [{ name: "Tessaly Knot", ra: 236.4, dec: 27.9, pmRa: 0.4, pmDec: -0.6, mag: 15.9, band: "I" }],
    obs: { telescope: "2.4", band: "I", snr: 160, frames: 5, epochs: 2, baseline: 1.5, reqPm: 3, moon: "grey", airmass: 1.5, seeing: 1.0 },
  },
  // --- single-epoch and monitoring programmes ---
  {
    title: "Colour–magnitude diagrams of three faint spring clusters",
    call: "2027A", status: "submitted", pi: "pi@kestrel-ridge.example", cois: ["reviewer2@kestrel-ridge.example"],
    category: "stellar-populations",
    abstract: "Deep B and I imaging of three faint clusters fixes their ages from the main-sequence turn-off.",
    targets: [
      { name: "Rookery Cluster 1", ra: 131.5, dec: 14.2, mag: 19.5, band: "V" },
      { name: "Rookery Cluster 2", ra: 139.8, dec: 9.7, mag: 19.8, band: "V" },
      { name: "Rookery Cluster 3", ra: 152.3, dec: 12.1, mag: 19.2, band: "V" },
    ],
    obs: { telescope: "2.4", band: "V", snr: 100, frames: 6, epochs: 1, moon: "dark", airmass: 1.6, seeing: 1.1 },
  },
  {
    title: "Flare rates of nearby M dwarfs with the 1.0 m",
    call: "2027A", status: "submitted", pi: "pi3@kestrel-ridge.example", cois: ["pi@kestrel-ridge.example"],
    category: "stellar-physics",
    abstract: "Monitoring of six invented nearby M dwarfs in U gives flare rates as a function of rotation.",
    targets: [
      { name: "Plover Star A", ra: 165.2, dec: 35.8, pmRa: -210, pmDec: 95, mag: 13.5, band: "V" },
      { name: "Plover Star B", ra: 178.9, dec: 28.4, pmRa: 160, pmDec: -340, mag: 13.9, band: "V" },
    ],
    obs: { telescope: "1.0", band: "V", exp: 60, frames: 20, epochs: 12, moon: "bright", airmass: 1.8, seeing: 1.4 },
  },
  {
    title: "Eclipse timings of short-period binaries",
    call: "2027A", status: "draft", pi: "pi@kestrel-ridge.example", cois: [],
    category: "stellar-physics",
    abstract: "Primary eclipse timings of four invented contact binaries constrain their period changes.",
    targets: [
      { name: "Stonechat Binary 1", ra: 198.4, dec: 42.5, mag: 12.1, band: "V" },
      // far too far south for the site: the sheet flags it
      { name: "Stonechat Binary 2", ra: 205.0, dec: -62.0, mag: 12.6, band: "V" },
    ],
    obs: { telescope: "1.0", band: "V", exp: 30, frames: 40, epochs: 3, moon: "bright", airmass: 2.0, seeing: 1.5 },
  },
  {
    title: "Surface photometry of spring dwarf galaxies",
    call: "2027A", status: "draft", pi: "pi2@kestrel-ridge.example", cois: ["pi4@kestrel-ridge.example"],
    category: "galaxies",
    abstract: "Deep R imaging of five low-surface-brightness dwarfs traces their outer discs.",
    targets: [
      { name: "Lowfen Dwarf 1", ra: 183.6, dec: 30.2, mag: 17.5, band: "R" },
      { name: "Lowfen Dwarf 2", ra: 190.4, dec: 26.9, mag: 17.9, band: "R" },
    ],
    obs: { telescope: "2.4", band: "R", snr: 60, frames: 10, epochs: 1, moon: "dark", airmass: 1.5, seeing: 1.2 },
  },
  {
    title: "Transit timing of a warm giant planet host",
    call: "2027A", status: "submitted", pi: "pi5@kestrel-ridge.example", cois: ["pi8@kestrel-ridge.example"],
    category: "exoplanets",
    abstract: "Four transits of the invented host Ember-3 time its orbit to 20 s.",
    targets: [{ name: "Ember-3", ra: 214.7, dec: 33.1, mag: 11.4, band: "R" }],
    obs: { telescope: "1.0", band: "R", exp: 12, frames: 150, epochs: 4, moon: "bright", airmass: 1.8, seeing: 1.6 },
  },
  {
    title: "Bright calibration stars for the Ridge Imager 4K",
    call: "2027A", status: "draft", pi: "pi6@kestrel-ridge.example", cois: [],
    category: "other",
    abstract: "A draft: standard-star fields for the 4K imager. Its exposure times are still too long for the brightest stars (the sheet says so).",
    targets: [{ name: "Calibration field Linnet", ra: 160.1, dec: 20.3, mag: 9.0, band: "V" }],
    obs: { telescope: "2.4", band: "V", exp: 60, frames: 3, epochs: 2, moon: "bright", airmass: 1.6, seeing: 1.2 },
  },
  {
    title: "Rotation periods in the Rookery clusters",
    call: "2027A", status: "withdrawn", coded: true, pi: "pi4@kestrel-ridge.example", cois: ["pi@kestrel-ridge.example"],
    category: "stellar-physics",
    abstract: "Withdrawn after submission: the team merged it into another programme.",
    targets: [{ name: "Rookery Cluster 2", ra: 139.8, dec: 9.7, mag: 16.5, band: "V" }],
    obs: { telescope: "1.0", band: "V", snr: 60, frames: 10, epochs: 8, moon: "grey", airmass: 1.7, seeing: 1.4 },
  },
  {
    title: "A search for dwarf novae in outburst",
    call: "2027A", status: "withdrawn", pi: "pi8@kestrel-ridge.example", cois: [],
    category: "transients", too: true,
    abstract: "Withdrawn as a draft: a target-of-opportunity programme for dwarf novae in outburst.",
    targets: [{ name: "Fieldfare Nova field", ra: 245.1, dec: 25.3, mag: 15.0, band: "V" }],
    obs: { telescope: "1.0", band: "V", snr: 30, frames: 5, epochs: 3, moon: "bright", airmass: 2.0, seeing: 1.5 },
  },
  {
    title: "Cometary activity of a distant Centaur",
    call: "2027A", status: "submitted", pi: "pi6@kestrel-ridge.example", cois: ["pi2@kestrel-ridge.example"],
    category: "solar-system",
    abstract: "Deep R imaging of an invented Centaur, Dunlin, at 12 au searches for a faint coma.",
    targets: [{ name: "Dunlin (Centaur) field", ra: 158.0, dec: 11.5, mag: 20.5, band: "R" }],
    obs: { telescope: "2.4", band: "R", snr: 40, frames: 12, epochs: 3, moon: "dark", airmass: 1.6, seeing: 1.1 },
  },
  {
    title: "Stellar populations in a polar-ring galaxy",
    call: "2027A", status: "submitted", pi: "pi7@kestrel-ridge.example", cois: [],
    category: "galaxies",
    abstract: "B and I imaging of the invented polar-ring galaxy Sedge Ring separates the ring's young stars from the host.",
    targets: [{ name: "Sedge Ring galaxy", ra: 219.9, dec: 47.4, mag: 15.2, band: "B" }],
    obs: { telescope: "2.4", band: "B", snr: 150, frames: 8, epochs: 1, moon: "dark", airmass: 1.6, seeing: 1.1 },
  },
  {
    title: "Variable stars in an outer-halo cluster",
    call: "2027A", status: "draft", pi: "pi3@kestrel-ridge.example", cois: ["reviewer3@kestrel-ridge.example"],
    category: "stellar-populations",
    abstract: "Time-series V photometry of the invented halo cluster Redpoll 5 identifies its pulsating variables.",
    targets: [{ name: "Redpoll 5", ra: 232.6, dec: 8.3, mag: 17.4, band: "V" }],
    obs: { telescope: "2.4", band: "V", snr: 40, frames: 12, epochs: 12, moon: "grey", airmass: 1.7, seeing: 1.2 },
  },
  {
    title: "Outburst monitoring of young eruptive stars",
    call: "2027B", status: "draft", pi: "pi2@kestrel-ridge.example", cois: [],
    category: "stellar-physics",
    abstract: "A draft for 2027B, started early: monitoring of three invented young eruptive stars in the autumn sky.",
    targets: [{ name: "Whinchat Star 1", ra: 318.4, dec: 44.2, mag: 14.5, band: "R" }],
    obs: { telescope: "1.0", band: "R", snr: 80, frames: 5, epochs: 6, moon: "bright", airmass: 1.8, seeing: 1.4 },
  },
  // --- 2026B, closed and decided ---
  {
    title: "Deep autumn imaging of a tidal stream",
    call: "2026B", status: "accepted", coded: true, pi: "pi@kestrel-ridge.example", cois: ["pi5@kestrel-ridge.example"],
    category: "galaxies",
    abstract: "Deep R imaging along an invented tidal stream around the galaxy Teal Arc measures its surface brightness profile.",
    targets: [
      { name: "Teal Arc stream north", ra: 11.2, dec: 41.6, mag: 18.5, band: "R" },
      { name: "Teal Arc stream south", ra: 10.6, dec: 40.3, mag: 18.8, band: "R" },
    ],
    obs: { telescope: "2.4", band: "R", snr: 80, frames: 10, epochs: 1, moon: "dark", airmass: 1.5, seeing: 1.2 },
  },
  {
    title: "Ages of two autumn open clusters",
    call: "2026B", status: "accepted", coded: true, pi: "pi2@kestrel-ridge.example", cois: ["pi3@kestrel-ridge.example"],
    category: "stellar-populations",
    abstract: "B and V photometry of the invented open clusters Sanderling 1 and 2 dates their turn-offs.",
    targets: [
      { name: "Sanderling 1", ra: 42.3, dec: 52.1, mag: 16.8, band: "V" },
      { name: "Sanderling 2", ra: 48.9, dec: 47.5, mag: 17.1, band: "V" },
    ],
    obs: { telescope: "1.0", band: "V", snr: 100, frames: 6, epochs: 1, moon: "grey", airmass: 1.6, seeing: 1.3 },
  },
  {
    title: "A transit survey of an autumn star field",
    call: "2026B", status: "accepted", coded: true, pi: "pi5@kestrel-ridge.example", cois: [],
    category: "exoplanets",
    abstract: "Continuous R photometry of the invented field Gadwall 2 searches for transiting giant planets.",
    targets: [{ name: "Gadwall 2 field", ra: 329.7, dec: 30.4, mag: 12.5, band: "R" }],
    obs: { telescope: "1.0", band: "R", exp: 30, frames: 100, epochs: 5, moon: "bright", airmass: 1.8, seeing: 1.5 },
  },
  {
    title: "Light curves of slowly rotating asteroids",
    call: "2026B", status: "waitlisted", coded: true, pi: "pi7@kestrel-ridge.example", cois: ["pi8@kestrel-ridge.example"],
    category: "solar-system",
    abstract: "Photometry of invented slow rotators near opposition in October.",
    targets: [{ name: "Asteroid field Smew", ra: 12.9, dec: 6.2, mag: 16.0, band: "R" }],
    obs: { telescope: "1.0", band: "R", snr: 50, frames: 30, epochs: 4, moon: "grey", airmass: 1.8, seeing: 1.4 },
  },
  {
    title: "Nova shells in the autumn sky",
    call: "2026B", status: "declined", coded: true, pi: "pi4@kestrel-ridge.example", cois: [],
    category: "transients",
    abstract: "Deep imaging of invented old nova sites to search for resolved shells.",
    targets: [{ name: "Garganey nova site", ra: 305.6, dec: 36.9, mag: 19.0, band: "R" }],
    obs: { telescope: "2.4", band: "R", snr: 60, frames: 10, epochs: 1, moon: "dark", airmass: 1.6, seeing: 1.2 },
  },
  {
    title: "Colours of distant cluster galaxies",
    call: "2026B", status: "in_review", coded: true, pi: "pi8@kestrel-ridge.example", cois: ["pi6@kestrel-ridge.example"],
    category: "galaxies",
    abstract: "V and I imaging of the invented galaxy cluster Pochard 12 measures its red sequence.",
    targets: [{ name: "Pochard 12", ra: 22.4, dec: 17.8, mag: 19.5, band: "I" }],
    obs: { telescope: "2.4", band: "I", snr: 60, frames: 8, epochs: 1, moon: "grey", airmass: 1.6, seeing: 1.1 },
  },
  {
    title: "Pulsating subdwarfs at high cadence",
    call: "2026B", status: "declined", coded: true, pi: "pi3@kestrel-ridge.example", cois: [],
    category: "stellar-physics",
    abstract: "Fast photometry of two invented subdwarf pulsators.",
    targets: [{ name: "Shoveler sdB 1", ra: 341.2, dec: 12.6, mag: 14.2, band: "B" }],
    obs: { telescope: "1.0", band: "B", exp: 20, frames: 120, epochs: 3, moon: "bright", airmass: 1.8, seeing: 1.5 },
  },
];

const scienceParagraphs = [
  "Scientific context. The question this programme addresses has been open since the first wide-field surveys of the region. The existing photometry cannot settle it: the key quantity is a motion or a time scale, and only repeated, well-calibrated imaging measures it.",
  "Immediate objective. We ask for the time listed on the cover to observe the targets in the technical pages. The exposure times follow from the signal-to-noise each measurement needs, as computed on the feasibility sheet, and every epoch falls inside the targets' visibility windows at the site.",
  "Method. Frames are bias- and flat-field corrected with the observatory's pipeline. Positions are measured by point-spread-function fitting and placed on a common reference frame defined by the field stars. Photometric zero points come from standard fields observed on the same nights.",
  "Expected results. The measurements give the parameters stated in the abstract with the precisions on the feasibility sheet. They will be published within a year of the last epoch, and the reduced images released with the paper.",
  "Why this telescope. The field of view and the stable pixel scale of the imager suit this programme; the time requested is modest compared with the semester's offer, and the observations can be scheduled flexibly within the windows shown.",
  "Team and status. The team has reduced similar data before and holds the software needed. Earlier epochs of some fields exist from previous semesters and are folded into the fit where they help.",
];

async function scienceCasePdf(title: string, pages: number): Promise<Uint8Array> {
  const doc = await PDFDocument.create();
  doc.setTitle(`Science case: ${title}`);
  doc.setCreator("Nightshare demo seed");
  const font = await doc.embedFont(StandardFonts.Helvetica);
  const bold = await doc.embedFont(StandardFonts.HelveticaBold);
  const wrap = (text: string, size: number, width: number) => {
    const lines: string[] = [];
    let line = "";
    for (const word of text.split(/\s+/)) {
      const next = line ? `${line} ${word}` : word;
      if (font.widthOfTextAtSize(next, size) > width && line) {
        lines.push(line);
        line = word;
      } else line = next;
    }
    if (line) lines.push(line);
    return lines;
  };
  const ascii = (s: string) => s.replace(/[–—]/g, "-").replace(/[^\x20-\x7e]/g, "");
  for (let p = 0; p < pages; p++) {
    const page = doc.addPage([595.28, 841.89]);
    let y = 780;
    if (p === 0) {
      for (const line of wrap(ascii(title), 16, 480)) {
        page.drawText(line, { x: 58, y, size: 16, font: bold, color: rgb(0.1, 0.1, 0.2) });
        y -= 22;
      }
      page.drawText("Science case", { x: 58, y: y - 4, size: 11, font, color: rgb(0.4, 0.4, 0.45) });
      y -= 36;
    } else {
      page.drawText(`${p + 1}. Continued`, { x: 58, y, size: 12, font: bold });
      y -= 24;
    }
    for (let k = 0; k < 3; k++) {
      const text = scienceParagraphs[(p * 3 + k) % scienceParagraphs.length];
      for (const line of wrap(text, 10.5, 480)) {
        page.drawText(line, { x: 58, y, size: 10.5, font });
        y -= 15;
      }
      y -= 10;
    }
    page.drawText(`page ${p + 1}`, { x: 280, y: 40, size: 9, font, color: rgb(0.5, 0.5, 0.5) });
  }
  return doc.save();
}

function longestSpan(start: string) {
  const years = Math.max(...demos.filter((d) => d.obs.baseline && callStart[d.call] === start).map((d) => d.obs.baseline ?? 1), 1);
  return Math.min(Math.round(years * 365.25) + 1, 366 * 6);
}
const callStart: Record<Demo["call"], string> = { "2026B": "2026-08-01", "2027A": "2027-02-01", "2027B": "2027-08-01" };

/** Epoch dates for an astrometric observation: per semester of the baseline, nights spread over the target's season. */
function plannedEpochDates(site: Parameters<typeof prepareSiteNights>[0], start: string, t: T, o: O, epochHours: number): string[] {
  const span = Math.min(Math.round((o.baseline ?? 1) * 365.25) + 1, 366 * 6);
  // One preparation per call start (two years, the longest demo baseline), sliced per baseline.
  const all = prepareSiteNights(site, start, longestSpan(start));
  const prepared = { ...all, nights: all.nights.slice(0, span) };
  const rank = { dark: 0, grey: 1, bright: 2 } as const;
  const rows = targetNights(prepared, { raDeg: t.ra, decDeg: t.dec, pmRaCosDecMasPerYr: t.pmRa ?? 0, pmDecMasPerYr: t.pmDec ?? 0 }, limitAltitude({ maxAirmass: o.airmass }));
  const bySemester = new Map<string, string[]>();
  for (const r of rows) {
    if (r.observableHours < Math.max(epochHours * 1.5, 0.75) || rank[r.night.moonCategory] > rank[o.moon]) continue;
    const s = semesterOf(r.night.date);
    bySemester.set(s, [...(bySemester.get(s) ?? []), r.night.date]);
  }
  const out: string[] = [];
  for (const dates of bySemester.values()) {
    const n = Math.min(o.epochs, dates.length);
    // Spread over the season, away from the semester's edges (where the next semester's epochs start).
    for (let i = 0; i < n; i++) out.push(dates[Math.floor(((i + 0.5) * dates.length) / n)]);
  }
  return [...new Set(out)].sort();
}

export async function up({ context: sequelize }: { context: Sequelize }) {
  await sequelize.transaction(async (transaction: Transaction) => {
    const now = new Date();
    for (const p of morePis) {
      await User.findOrCreate({
        where: { email: p.email },
        defaults: { email: p.email, name: p.name, institution: p.institution, isMemberInstitution: p.member, lastSignInAt: null },
        transaction,
      });
    }
    const [call2027A, call2027B] = await Promise.all(["2027A", "2027B"].map((s) => Call.findOne({ where: { semesterCode: s }, transaction })));
    if (!call2027A || !call2027B) throw new Error("Run the demo-observatory seeder first (calls 2027A and 2027B).");
    const [call2026B, created2026B] = await Call.findOrCreate({
      where: { semesterCode: "2026B" },
      defaults: {
        semesterCode: "2026B",
        title: "Call for proposals 2026B",
        opensAt: new Date("2026-03-01T00:00:00Z"),
        deadlineAt: new Date("2026-05-15T23:59:00Z"),
        semesterStart: "2026-08-01",
        semesterEnd: "2027-01-31",
        pageLimit: 4,
        currency: "eur",
        accessFeePerHourCents: 90_000,
        pageChargeCents: 18_000,
      },
      transaction,
    });
    const telescopes = await Telescope.findAll({ include: [{ model: Instrument, as: "instruments", include: [{ model: Filter, as: "filters" }] }], transaction });
    const byAperture = (a: "2.4" | "1.0") => telescopes.find((t) => t.apertureM === Number(a));
    if (created2026B) {
      const offers = { "2.4": { dark: 400, grey: 360, bright: 380 }, "1.0": { dark: 500, grey: 440, bright: 460 } } as const;
      for (const a of ["2.4", "1.0"] as const) {
        const tel = byAperture(a);
        if (!tel) continue;
        for (const [moonCategory, hoursOffered] of Object.entries(offers[a])) {
          await CallOffer.create({ callId: call2026B.id, telescopeId: tel.id, moonCategory: moonCategory as MoonCategory, hoursOffered }, { transaction });
        }
      }
    }
    const calls = { "2026B": call2026B, "2027A": call2027A, "2027B": call2027B };
    const users = new Map((await User.findAll({ transaction })).map((u) => [u.email, u]));
    const serials: Record<string, number> = {};
    for (const code of Object.keys(calls)) {
      const call = calls[code as keyof typeof calls];
      serials[code] = (await Proposal.max<number, Proposal>("serial", { where: { callId: call.id }, transaction })) ?? 0;
    }

    const audits: { actorId: number; action: string; entityType: string; entityId: number; proposalId: number; details: Record<string, unknown> }[] = [];
    for (const [index, d] of demos.entries()) {
      const call = calls[d.call];
      const pi = users.get(d.pi);
      if (!pi) throw new Error(`Demo user ${d.pi} is missing`);
      const coded = d.coded || ["submitted", "in_review", "accepted", "waitlisted", "declined"].includes(d.status);
      const existing = await Proposal.findOne({ where: { title: d.title }, transaction });
      if (existing) continue;
      const serial = coded ? ++serials[d.call] : null;
      const submittedAt = coded
        ? d.call === "2026B"
          ? new Date(Date.UTC(2026, 4, 1 + (index % 14), 9 + (index % 8), 15))
          : new Date(now.getTime() - (2 + (index % 9)) * 86_400_000)
        : null;
      const proposal = await Proposal.create(
        {
          callId: call.id,
          code: serial ? `NS-${d.call}-${String(serial).padStart(3, "0")}` : null,
          serial,
          title: d.title,
          abstract: d.abstract,
          scienceCategory: d.category,
          status: d.status,
          isMultiSemester: Boolean(d.multi),
          semestersRequested: d.multi ?? [d.call],
          isTargetOfOpportunity: Boolean(d.too),
          submittedAt,
          createdById: pi.id,
        },
        { transaction },
      );
      await ProposalMember.bulkCreate(
        [
          { proposalId: proposal.id, userId: pi.id, email: pi.email, role: "pi" as const, acceptedAt: proposal.createdAt },
          ...d.cois.map((email) => {
            const u = users.get(email);
            return { proposalId: proposal.id, userId: u?.id ?? null, email, role: "coi" as const, acceptedAt: u ? proposal.createdAt : null };
          }),
        ],
        { transaction },
      );

      const telescope = byAperture(d.obs.telescope)!;
      const instrument = telescope.instruments![0];
      const filter = instrument.filters!.find((f) => f.band === d.obs.band)!;
      const site = { latitudeDeg: telescope.latitudeDeg, longitudeDeg: telescope.longitudeDeg, elevationM: telescope.elevationM, timeZone: telescope.timeZone };
      const targets = await Target.bulkCreate(
        d.targets.map((t) => ({ proposalId: proposal.id, name: t.name, raDeg: t.ra, decDeg: t.dec, pmRaMasPerYr: t.pmRa ?? null, pmDecMasPerYr: t.pmDec ?? null, magnitude: t.mag, band: t.band, notes: null })),
        { transaction },
      );
      const observations = await Observation.bulkCreate(
        targets.map((target) => ({
            proposalId: proposal.id,
            targetId: target.id,
            instrumentId: instrument.id,
            filterId: filter.id,
            snrGoal: d.obs.snr ?? null,
            exposureSeconds: d.obs.snr ? null : (d.obs.exp ?? 60),
            framesPerEpoch: d.obs.frames,
            epochsPerSemester: d.obs.epochs,
            baselineYears: d.obs.baseline ?? null,
            requiredPmPrecisionMasPerYr: d.obs.reqPm ?? null,
            moonCategory: d.obs.moon,
            maxAirmass: d.obs.airmass,
            seeingArcsec: d.obs.seeing,
        })),
        { transaction },
      );
      if (d.obs.baseline) {
        const today = now.toISOString().slice(0, 10);
        await PlannedEpoch.bulkCreate(
          observations.flatMap((observation, i) =>
            // Half an hour per epoch bounds these frame counts; the sheet computes the exact time.
            plannedEpochDates(site, call.semesterStart, d.targets[i], d.obs, 0.5).map((date) => {
              const past = date < today && d.status === "accepted";
              return { observationId: observation.id, date, semesterCode: semesterOf(date), status: past ? ("observed" as const) : ("planned" as const), observedAt: past ? new Date(`${date}T08:00:00Z`) : null };
            }),
          ),
          { transaction },
        );
      }

      if (!(d.status === "draft" && index % 4 === 0)) {
        const pages = 2 + (index % 3);
        const bytes = await scienceCasePdf(d.title, pages);
        const file = await StoredFile.create(
          {
            proposalId: proposal.id,
            kind: "science_case",
            filename: `science-case-${proposal.id}.pdf`,
            contentType: "application/pdf",
            sizeBytes: bytes.byteLength,
            sha256: createHash("sha256").update(bytes).digest("hex"),
            pageCount: pages,
            data: Buffer.from(bytes),
            uploadedById: pi.id,
          },
          { transaction },
        );
        audits.push({ actorId: pi.id, action: "science_case.uploaded", entityType: "stored_file", entityId: file.id, proposalId: proposal.id, details: { filename: file.filename, pageCount: pages, seeded: true } });
      }
      audits.push({ actorId: pi.id, action: "proposal.created", entityType: "proposal", entityId: proposal.id, proposalId: proposal.id, details: { seeded: true, semesterCode: d.call } });
      if (coded) audits.push({ actorId: pi.id, action: "proposal.submitted", entityType: "proposal", entityId: proposal.id, proposalId: proposal.id, details: { code: proposal.code, seeded: true } });
      if (d.status === "withdrawn") audits.push({ actorId: pi.id, action: "proposal.withdrawn", entityType: "proposal", entityId: proposal.id, proposalId: proposal.id, details: { code: proposal.code, seeded: true } });
    }
    await AuditEntry.bulkCreate(audits, { transaction });
  });
}

export async function down() {}

export { demos as demoProposals };
