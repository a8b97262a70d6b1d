// The invented data of the demo proposals (see seeders/20261201000300-demo-proposals.ts, which
// inserts it, for the stages, the seasons and the empty-sky rule every field here keeps).
import type { MoonCategory } from "~/lib/domain";
import { surveyFields } from "./demo-survey";

export const morePis = [
  { email: "pi5@kestrel-ridge.example", name: "Mireille Oyelaran-Voss", institution: "Eskerfield University", member: true },
  { email: "pi6@kestrel-ridge.example", name: "Dario Fenwick-Sato", institution: "Pellham Astrophysical Laboratory", member: false },
  { email: "pi7@kestrel-ridge.example", name: "Agathe Lindqvist-Mbeki", institution: "Northwold College", member: true },
  { email: "pi8@kestrel-ridge.example", name: "Tobiah Rennick", institution: "Caddow School of Physics", member: false },
];

export type T = { name: string; ra: number; dec: number; pmRa?: number; pmDec?: number; mag: number; band: string };
export type O = {
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
export type Stage = "running" | "review" | "open";
export type Demo = {
  title: string;
  stage: Stage;
  /** the half of the year (A: Feb–Jul, B: Aug–Jan) whose sky the targets were chosen for */
  half: "A" | "B";
  status: "draft" | "submitted" | "in_review" | "accepted" | "waitlisted" | "declined" | "withdrawn";
  coded?: boolean;
  pi: string;
  cois: string[];
  category: string;
  abstract: string;
  /** a multi-semester programme over this many semesters, from the call's own */
  multi?: number;
  too?: boolean;
  targets: T[];
  obs: O;
  pages?: number;
};

// RA in degrees. A semesters (Feb–Jul) favour RA 8–17 h; B semesters (Aug–Jan) RA 20–4 h.
export const demos: Demo[] = [
  // --- multi-epoch astrometry of invented cluster fields ---
  {
    title: "Proper motions in Kestrel Field 7: membership of a sparse old cluster",
    stage: "review", half: "A", status: "submitted", pi: "pi@kestrel-ridge.example", cois: ["pi3@kestrel-ridge.example", "reviewer4@kestrel-ridge.example"],
    category: "clusters-astrometry", multi: 4,
    abstract: "We will measure relative proper motions of faint stars in two fields of Kestrel Field 7, a sparse cluster at about 1.1 kpc, to separate members from the field down to I = 19. Two epochs per semester in I over two years on the 2.4 m reach 2 mas/yr, enough to separate members from the field by their common motion.",
    targets: [
      { name: "Kestrel Field 7 centre", ra: 146.21, dec: 33.42, pmRa: -3.1, pmDec: -5.6, mag: 17.2, band: "I" },
      { name: "Kestrel Field 7 north", ra: 146.35, dec: 33.71, pmRa: -3.0, pmDec: -5.4, mag: 17.6, band: "I" },
    ],
    obs: { telescope: "2.4", band: "I", snr: 150, frames: 5, epochs: 2, baseline: 2, reqPm: 2, moon: "grey", airmass: 1.5, seeing: 1.0 },
  },
  {
    title: "A parallax ladder for the Ossel Cluster",
    stage: "review", half: "A", status: "submitted", pi: "pi2@kestrel-ridge.example", cois: ["pi@kestrel-ridge.example"],
    category: "clusters-astrometry", multi: 3,
    abstract: "Trigonometric parallaxes of the brightest giants in the core of the Ossel Cluster, at an estimated 450 pc, tie its main-sequence fitting distance to a geometric one. Two R-band epochs per semester over 18 months, placed near the parallax-factor extremes of each season, reach 3 mas/yr in proper motion and the parallax the distance needs.",
    targets: [{ name: "Ossel Cluster core", ra: 174.6, dec: 25.9, pmRa: 6.2, pmDec: -11.4, mag: 14.1, band: "R" }],
    obs: { telescope: "2.4", band: "R", snr: 200, frames: 6, epochs: 2, baseline: 1.5, reqPm: 3, moon: "grey", airmass: 1.6, seeing: 1.0 },
  },
  {
    title: "Internal kinematics of the Brannock Field 2 association",
    stage: "open", half: "A", status: "draft", pi: "pi@kestrel-ridge.example", cois: ["pi4@kestrel-ridge.example", "h.okafor-strand@saltmere.example"],
    category: "clusters-astrometry", multi: 4,
    abstract: "Brannock Field 2 is a young association whose expansion age is unknown. Three I-band fields over a two-year astrometric baseline with the 2.4 m give proper motions to 1.5 mas/yr for about 300 members and an expansion age to 15 %.",
    targets: [
      { name: "Brannock Field 2 A", ra: 201.3, dec: 18.4, pmRa: -1.8, pmDec: -2.2, mag: 16.4, band: "I" },
      { name: "Brannock Field 2 B", ra: 201.9, dec: 18.1, pmRa: -1.7, pmDec: -2.4, mag: 16.8, band: "I" },
      { name: "Brannock Field 2 C", ra: 202.4, dec: 18.6, pmRa: -1.9, pmDec: -2.1, mag: 17.1, band: "I" },
    ],
    obs: { telescope: "2.4", band: "I", snr: 120, frames: 4, epochs: 2, baseline: 2, reqPm: 1.5, moon: "dark", airmass: 1.5, seeing: 1.0 },
  },
  {
    title: "Runaway candidates around the Quillon Group",
    stage: "review", half: "A", status: "withdrawn", coded: true, pi: "pi5@kestrel-ridge.example", cois: ["pi2@kestrel-ridge.example"],
    category: "clusters-astrometry", multi: 3,
    abstract: "Stars ejected from the Quillon Group should move away from its centre at 20–40 km/s. In one R-band field around the group we measure proper motions of its twelve candidates to 3 mas/yr over 18 months.",
    targets: [{ name: "Quillon Group field", ra: 228.8, dec: 38.2, pmRa: -4.4, pmDec: 1.2, mag: 15.3, band: "R" }],
    obs: { telescope: "2.4", band: "R", snr: 150, frames: 4, epochs: 2, baseline: 1.5, reqPm: 3, moon: "grey", airmass: 1.6, seeing: 1.1 },
  },
  {
    title: "Merrow Field 11: a tidal tail in proper-motion space",
    stage: "open", half: "B", status: "draft", pi: "pi7@kestrel-ridge.example", cois: [],
    category: "clusters-astrometry", multi: 3,
    abstract: "The leading tidal tail of the Merrow Field 11 cluster should stand out in proper motion from the field. One I-band field on the tail, two epochs per semester over 18 months, reaches 3.5 mas/yr.",
    targets: [{ name: "Merrow Field 11 tail", ra: 11.4, dec: 33.8, pmRa: 2.3, pmDec: -6.1, mag: 17.8, band: "I" }],
    obs: { telescope: "2.4", band: "I", snr: 100, frames: 5, epochs: 2, baseline: 1.5, reqPm: 3.5, moon: "dark", airmass: 1.5, seeing: 1.0 },
  },
  {
    title: "Harlan Drift 4 membership from an 18-month baseline",
    stage: "running", half: "B", status: "accepted", coded: true, pi: "pi3@kestrel-ridge.example", cois: ["pi@kestrel-ridge.example", "pi6@kestrel-ridge.example"],
    category: "clusters-astrometry", multi: 3,
    abstract: "Harlan Drift 4 is a dissolving cluster at 700 pc. I-band proper motions to 3 mas/yr from an 18-month baseline, two epochs per semester, give its membership and the velocity of its dissolution.",
    targets: [{ name: "Harlan Drift 4", ra: 30.2, dec: 25.3, pmRa: 8.8, pmDec: -4.9, mag: 16.2, band: "I" }],
    obs: { telescope: "2.4", band: "I", snr: 150, frames: 5, epochs: 2, baseline: 1.5, reqPm: 3, moon: "grey", airmass: 1.5, seeing: 1.0 },
  },
  {
    title: "Veymoor Field 3 white dwarfs: parallaxes for the cooling sequence",
    stage: "running", half: "B", status: "waitlisted", coded: true, pi: "pi4@kestrel-ridge.example", cois: ["pi7@kestrel-ridge.example"],
    category: "clusters-astrometry", multi: 2,
    abstract: "Faint white dwarfs in Veymoor Field 3 need parallaxes to place them on the cooling sequence. The 2.4 m reaches them in dark time at SNR 80 per R frame; two epochs per semester over one year give proper motions to 6 mas/yr and a first parallax.",
    targets: [{ name: "Veymoor Field 3", ra: 356.1, dec: 19.6, pmRa: 41.0, pmDec: -18.5, mag: 18.4, band: "R" }],
    obs: { telescope: "2.4", band: "R", snr: 80, frames: 6, epochs: 2, baseline: 1, reqPm: 6, moon: "dark", airmass: 1.5, seeing: 1.0 },
  },
  {
    title: "Anselm Cluster: binaries from astrometric wobble",
    stage: "running", half: "B", status: "accepted", coded: true, pi: "pi6@kestrel-ridge.example", cois: ["pi5@kestrel-ridge.example"],
    category: "clusters-astrometry", multi: 3,
    abstract: "Unresolved binaries in the Anselm Cluster show as residuals from a five-parameter fit. Three I-band epochs per semester over 18 months flag wobbles above 3 mas and reach 2.5 mas/yr in proper motion.",
    targets: [{ name: "Anselm Cluster", ra: 62.9, dec: 31.7, pmRa: 1.9, pmDec: -7.7, mag: 15.8, band: "I" }],
    obs: { telescope: "2.4", band: "I", snr: 180, frames: 5, epochs: 3, baseline: 1.5, reqPm: 2.5, moon: "grey", airmass: 1.5, seeing: 1.0 },
  },
  {
    title: "Calder Field 9 with the 1.0 m: bright-member proper motions",
    stage: "running", half: "B", status: "declined", coded: true, pi: "pi8@kestrel-ridge.example", cois: [],
    category: "clusters-astrometry", multi: 2,
    abstract: "The bright members of Calder Field 9 are within reach of the 1.0 m. One year of V-band epochs, two per semester, measures their bulk motion to 10 mas/yr.",
    targets: [{ name: "Calder Field 9", ra: 19.2, dec: 43.1, pmRa: -2.4, pmDec: -1.1, mag: 13.2, band: "V" }],
    obs: { telescope: "1.0", band: "V", snr: 150, frames: 4, epochs: 2, baseline: 1, reqPm: 10, moon: "grey", airmass: 1.6, seeing: 1.3 },
  },
  {
    title: "Tessaly Knot: the slowest cluster in the sky?",
    stage: "review", half: "A", status: "submitted", pi: "pi7@kestrel-ridge.example", cois: ["pi3@kestrel-ridge.example"],
    category: "clusters-astrometry", multi: 3,
    abstract: "The Tessaly Knot appears to share the Sun's motion to within 3 mas/yr. Three semesters of I-band epochs, two per semester, test whether it is a true comoving group.",
    targets: [{ name: "Tessaly Knot", ra: 236.4, dec: 27.9, pmRa: 0.4, pmDec: -0.6, mag: 15.9, band: "I" }],
    obs: { telescope: "2.4", band: "I", snr: 160, frames: 5, epochs: 2, baseline: 1.5, reqPm: 3, moon: "grey", airmass: 1.5, seeing: 1.0 },
  },
  // --- single-epoch and monitoring programmes ---
  {
    title: "Colour–magnitude diagrams of three faint clusters",
    stage: "review", half: "A", status: "submitted", pi: "pi@kestrel-ridge.example", cois: ["reviewer2@kestrel-ridge.example"],
    category: "stellar-populations",
    abstract: "Deep V imaging of the three faint Rookery clusters, one visit each, reaches two magnitudes below their main-sequence turn-offs; with the shallower B frames already in hand it fixes their ages.",
    targets: [
      { name: "Rookery Cluster 1", ra: 128.0, dec: 13.2, mag: 19.5, band: "V" },
      { name: "Rookery Cluster 2", ra: 139.8, dec: 9.7, mag: 19.8, band: "V" },
      { name: "Rookery Cluster 3", ra: 156.3, dec: 14.1, mag: 19.2, band: "V" },
    ],
    obs: { telescope: "2.4", band: "V", snr: 100, frames: 6, epochs: 1, moon: "dark", airmass: 1.6, seeing: 1.1 },
  },
  {
    title: "Flare rates of two nearby M dwarfs with the 1.0 m",
    stage: "review", half: "A", status: "submitted", pi: "pi3@kestrel-ridge.example", cois: ["pi@kestrel-ridge.example"],
    category: "stellar-physics",
    abstract: "Twelve V-band monitoring visits in bright time of two invented nearby M dwarfs, Plover Star A and B, each visit twenty one-minute frames, give their flare rates as a function of rotation.",
    targets: [
      { name: "Plover Star A", ra: 172.8, dec: 29.0, pmRa: -184, pmDec: 72, mag: 13.5, band: "V" },
      { name: "Plover Star B", ra: 181.9, dec: 24.4, pmRa: 121, pmDec: -236, mag: 13.9, band: "V" },
    ],
    obs: { telescope: "1.0", band: "V", exp: 60, frames: 20, epochs: 12, moon: "bright", airmass: 1.8, seeing: 1.4 },
  },
  {
    title: "Eclipse timings of short-period binaries",
    stage: "open", half: "A", status: "draft", pi: "pi@kestrel-ridge.example", cois: [],
    category: "stellar-physics",
    abstract: "Primary eclipse timings of two invented contact binaries, three V-band visits each, constrain their period changes.",
    targets: [
      { name: "Stonechat Binary 1", ra: 193.4, dec: 46.5, mag: 12.1, band: "V" },
      // far too far south for the site: the sheet flags it
      { name: "Stonechat Binary 2", ra: 213.0, dec: -66.0, mag: 12.6, band: "V" },
    ],
    obs: { telescope: "1.0", band: "V", exp: 30, frames: 40, epochs: 3, moon: "bright", airmass: 2.0, seeing: 1.5 },
  },
  {
    title: "Surface photometry of two dwarf galaxies",
    stage: "open", half: "A", status: "draft", pi: "pi2@kestrel-ridge.example", cois: ["pi4@kestrel-ridge.example"],
    category: "galaxies",
    abstract: "Deep R imaging of two invented low-surface-brightness dwarfs, Lowfen Dwarf 1 and 2, in dark time traces their outer discs.",
    targets: [
      { name: "Lowfen Dwarf 1", ra: 180.6, dec: 33.2, mag: 17.5, band: "R" },
      { name: "Lowfen Dwarf 2", ra: 190.4, dec: 20.9, mag: 17.9, band: "R" },
    ],
    obs: { telescope: "2.4", band: "R", snr: 60, frames: 10, epochs: 1, moon: "dark", airmass: 1.5, seeing: 1.2 },
  },
  {
    title: "Transit timing of a warm giant planet host",
    stage: "review", half: "A", status: "submitted", pi: "pi5@kestrel-ridge.example", cois: ["pi8@kestrel-ridge.example"],
    category: "exoplanets",
    abstract: "Four R-band transits of the invented host Ember-3 with the 1.0 m time its orbit to 20 s.",
    targets: [{ name: "Ember-3", ra: 216.7, dec: 36.1, mag: 11.4, band: "R" }],
    obs: { telescope: "1.0", band: "R", exp: 12, frames: 150, epochs: 4, moon: "bright", airmass: 1.8, seeing: 1.6 },
  },
  {
    title: "Bright calibration stars for the Ridge Imager 4K",
    stage: "open", half: "A", status: "draft", pi: "pi6@kestrel-ridge.example", cois: [],
    category: "other",
    abstract: "A draft: one V-band standard-star field for the 4K imager, two visits. Its exposure times are still too long for the brightest stars (the sheet says so).",
    targets: [{ name: "Calibration field Linnet", ra: 162.1, dec: 26.3, mag: 9.0, band: "V" }],
    obs: { telescope: "2.4", band: "V", exp: 60, frames: 3, epochs: 2, moon: "bright", airmass: 1.6, seeing: 1.2 },
  },
  {
    title: "Rotation periods in the Rookery clusters",
    stage: "review", half: "A", status: "withdrawn", coded: true, pi: "pi4@kestrel-ridge.example", cois: ["pi@kestrel-ridge.example"],
    category: "stellar-physics",
    abstract: "Withdrawn after submission: the team merged it into another programme. Eight V-band visits of Rookery Cluster 2 were to give rotation periods of its brightest members.",
    targets: [{ name: "Rookery Cluster 2", ra: 139.8, dec: 9.7, mag: 16.5, band: "V" }],
    obs: { telescope: "1.0", band: "V", snr: 60, frames: 10, epochs: 8, moon: "grey", airmass: 1.7, seeing: 1.4 },
  },
  {
    title: "A search for dwarf novae in outburst",
    stage: "review", half: "A", status: "withdrawn", pi: "pi8@kestrel-ridge.example", cois: [],
    category: "transients", too: true,
    abstract: "Withdrawn as a draft: a target-of-opportunity programme for dwarf novae in outburst in one V-band field, three visits when an outburst is announced.",
    targets: [{ name: "Fieldfare Nova field", ra: 247.1, dec: 31.3, mag: 15.0, band: "V" }],
    obs: { telescope: "1.0", band: "V", snr: 30, frames: 5, epochs: 3, moon: "bright", airmass: 2.0, seeing: 1.5 },
  },
  {
    title: "Cometary activity of a distant Centaur",
    stage: "review", half: "A", status: "submitted", pi: "pi6@kestrel-ridge.example", cois: ["pi2@kestrel-ridge.example"],
    category: "solar-system",
    abstract: "Deep R imaging of the field of an invented Centaur, Dunlin, at 12 au searches for a faint coma in three dark-time visits.",
    targets: [{ name: "Dunlin (Centaur) field", ra: 162.0, dec: 5.5, mag: 20.5, band: "R" }],
    obs: { telescope: "2.4", band: "R", snr: 40, frames: 12, epochs: 3, moon: "dark", airmass: 1.6, seeing: 1.1 },
  },
  {
    title: "Stellar populations in a polar-ring galaxy",
    stage: "review", half: "A", status: "submitted", pi: "pi7@kestrel-ridge.example", cois: [],
    category: "galaxies",
    abstract: "Deep B imaging of the invented polar-ring galaxy Sedge Ring maps the ring's young stars against the redder host in one dark-time visit.",
    targets: [{ name: "Sedge Ring galaxy", ra: 223.9, dec: 45.4, mag: 15.2, band: "B" }],
    obs: { telescope: "2.4", band: "B", snr: 150, frames: 8, epochs: 1, moon: "dark", airmass: 1.6, seeing: 1.1 },
  },
  {
    title: "Variable stars in an outer-halo cluster",
    stage: "open", half: "A", status: "draft", pi: "pi3@kestrel-ridge.example", cois: ["reviewer3@kestrel-ridge.example"],
    category: "stellar-populations",
    abstract: "Twelve visits of time-series V photometry of the invented halo cluster Redpoll 5 identify its pulsating variables.",
    targets: [{ name: "Redpoll 5", ra: 229.6, dec: 11.3, mag: 17.4, band: "V" }],
    obs: { telescope: "2.4", band: "V", snr: 40, frames: 12, epochs: 12, moon: "grey", airmass: 1.7, seeing: 1.2 },
  },
  {
    title: "Outburst monitoring of a young eruptive star",
    stage: "open", half: "B", status: "draft", pi: "pi2@kestrel-ridge.example", cois: [],
    category: "stellar-physics",
    abstract: "Six R-band monitoring visits in bright time of the invented young eruptive star Whinchat Star 1 follow its brightness between outbursts.",
    targets: [{ name: "Whinchat Star 1", ra: 330.4, dec: 52.2, mag: 14.5, band: "R" }],
    obs: { telescope: "1.0", band: "R", snr: 80, frames: 5, epochs: 6, moon: "bright", airmass: 1.8, seeing: 1.4 },
  },
  // --- the running semester, decided ---
  {
    title: "Deep imaging of a tidal stream",
    stage: "running", half: "B", status: "accepted", coded: true, pi: "pi@kestrel-ridge.example", cois: ["pi5@kestrel-ridge.example"],
    category: "galaxies",
    abstract: "Deep R imaging of two fields along an invented tidal stream around the galaxy Teal Arc measures its surface-brightness profile in one dark-time visit each.",
    targets: [
      { name: "Teal Arc stream north", ra: 30.2, dec: 40.6, mag: 18.5, band: "R" },
      { name: "Teal Arc stream south", ra: 29.6, dec: 39.3, mag: 18.8, band: "R" },
    ],
    obs: { telescope: "2.4", band: "R", snr: 80, frames: 10, epochs: 1, moon: "dark", airmass: 1.5, seeing: 1.2 },
  },
  {
    title: "Ages of two open clusters",
    stage: "running", half: "B", status: "accepted", coded: true, pi: "pi2@kestrel-ridge.example", cois: ["pi3@kestrel-ridge.example"],
    category: "stellar-populations",
    abstract: "Deep V photometry of the invented open clusters Sanderling 1 and 2 reaches below their turn-offs; with the B frames of an earlier programme it dates them.",
    targets: [
      { name: "Sanderling 1", ra: 39.3, dec: 55.1, mag: 16.8, band: "V" },
      { name: "Sanderling 2", ra: 52.9, dec: 44.5, mag: 17.1, band: "V" },
    ],
    obs: { telescope: "1.0", band: "V", snr: 100, frames: 6, epochs: 1, moon: "grey", airmass: 1.6, seeing: 1.3 },
  },
  {
    title: "A transit survey of a star field",
    stage: "running", half: "B", status: "accepted", coded: true, pi: "pi5@kestrel-ridge.example", cois: [],
    category: "exoplanets",
    abstract: "Five long R-band runs in bright time on the invented field Gadwall 2 search for transiting giant planets.",
    targets: [{ name: "Gadwall 2 field", ra: 326.7, dec: 27.4, mag: 12.5, band: "R" }],
    obs: { telescope: "1.0", band: "R", exp: 30, frames: 100, epochs: 5, moon: "bright", airmass: 1.8, seeing: 1.5 },
  },
  {
    title: "Light curves of slowly rotating asteroids",
    stage: "running", half: "B", status: "waitlisted", coded: true, pi: "pi7@kestrel-ridge.example", cois: ["pi8@kestrel-ridge.example"],
    category: "solar-system",
    abstract: "Four R-band visits of an invented asteroid field near opposition give light curves of its slow rotators.",
    targets: [{ name: "Asteroid field Smew", ra: 16.9, dec: 10.2, mag: 16.0, band: "R" }],
    obs: { telescope: "1.0", band: "R", snr: 50, frames: 30, epochs: 4, moon: "grey", airmass: 1.8, seeing: 1.4 },
  },
  {
    title: "Nova shells around an old nova",
    stage: "running", half: "B", status: "declined", coded: true, pi: "pi4@kestrel-ridge.example", cois: [],
    category: "transients",
    abstract: "Deep R imaging of one invented old nova site in dark time searches for a resolved shell.",
    targets: [{ name: "Garganey nova site", ra: 301.6, dec: 33.9, mag: 19.0, band: "R" }],
    obs: { telescope: "2.4", band: "R", snr: 60, frames: 10, epochs: 1, moon: "dark", airmass: 1.6, seeing: 1.2 },
  },
  {
    title: "The red sequence of a distant galaxy cluster",
    stage: "running", half: "B", status: "waitlisted", coded: true, pi: "pi8@kestrel-ridge.example", cois: ["pi6@kestrel-ridge.example"],
    category: "galaxies",
    abstract: "Deep I imaging of the invented galaxy cluster Pochard 12, added to archival V frames, measures its red sequence.",
    targets: [{ name: "Pochard 12", ra: 26.4, dec: 19.8, mag: 19.5, band: "I" }],
    obs: { telescope: "2.4", band: "I", snr: 60, frames: 8, epochs: 1, moon: "grey", airmass: 1.6, seeing: 1.1 },
  },
  {
    title: "Pulsating subdwarfs at high cadence",
    stage: "running", half: "B", status: "declined", coded: true, pi: "pi3@kestrel-ridge.example", cois: [],
    category: "stellar-physics",
    abstract: "Fast B photometry of the invented subdwarf pulsator Shoveler sdB 1, three runs of 120 twenty-second frames, resolves its pulsation modes.",
    targets: [{ name: "Shoveler sdB 1", ra: 345.2, dec: 9.6, mag: 14.2, band: "B" }],
    obs: { telescope: "1.0", band: "B", exp: 20, frames: 120, epochs: 3, moon: "bright", airmass: 1.8, seeing: 1.5 },
  },
];

// Our own structure for a demo science case: six sections, each a heading and a paragraph.
export const scienceSections: [string, string][] = [
  ["What is not known yet", "The question behind this programme has stayed open since the first wide-field images of the region. The photometry in hand cannot settle it: what decides it is a motion or a time scale, and only repeated, well-calibrated imaging measures that."],
  ["What these nights will measure", "The nights asked for on the cover observe the targets listed in the technical pages, in the filter given there. Exposure times follow from the signal-to-noise each measurement needs, as the feasibility sheet computes it, and every visit falls inside the targets' windows at the site."],
  ["From frames to numbers", "Frames are bias- and flat-field corrected with the observatory's pipeline. Positions come from fits of the point-spread function, placed on a common frame defined by the field stars; zero points come from standard fields taken on the same nights."],
  ["What comes out, and when", "The programme gives the quantities named in the abstract with the precisions on the feasibility sheet. A data-release paper follows within a year of the last visit, with the reduced images made public beside it."],
  ["Why this telescope", "The imager's field and its stable pixel scale suit the programme; the time asked for is small against the semester's offer, and the visits can be placed flexibly inside the windows shown."],
  ["The team and what is already in hand", "The team has reduced data of this kind before and runs the software needed. Earlier frames of some fields exist from past semesters and enter the fit where they help."],
];

/** The survey of issue-sized scale: 500 fields, one R-band visit each, led by the demo PI. */
const survey: Demo = {
  title: "The Wren Survey: faint halo stars in 500 fields",
  stage: "review", half: "A", status: "submitted", pi: "pi@kestrel-ridge.example", cois: ["pi5@kestrel-ridge.example", "reviewer2@kestrel-ridge.example"],
  category: "stellar-populations",
  abstract: "The Wren Survey images 500 invented high-latitude fields once each in R with the 1.0 m, three two-minute frames per field in dark time, to count faint halo stars down to R = 20 and map how their density falls with distance from the plane. The fields tile the sky well placed in the semester; together they ask for about a fifth of the semester's dark time on the 1.0 m.",
  targets: surveyFields(),
  obs: { telescope: "1.0", band: "R", exp: 120, frames: 3, epochs: 1, moon: "dark", airmass: 1.8, seeing: 1.4 },
};
export const allDemos = [...demos, survey];
