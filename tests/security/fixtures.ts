// Shared by the security suite: every URL pattern of app/routes.ts, the demo people, and the
// seeded ids the parameterised patterns are tried with.
import { demoCallPlan } from "../../sequelize/seeders/20261201000100-demo-observatory";
import routes from "~/routes";
import { Call, Instrument, Proposal, ProposalMember, ReviewAssignment, StoredFile, Telescope, User } from "~/models/index.server";
import { ensureDatabase } from "../helpers/db";
import { sessionCookieFor } from "../helpers/session";
import { pdfWithPages } from "../integration/proposals-fixtures";

type RouteNode = { path?: string; index?: boolean; file: string; children?: RouteNode[] };

export type FlatRoute = {
  /** `/proposals/:proposalId/team`; index routes end in `?index` (where their action is posted). */
  key: string;
  /** the URL pattern without `?index` */
  pattern: string;
  file: string;
};

/** Every route of app/routes.ts that answers a URL (pathless layouts are only walked through). */
export function flattenRoutes(nodes: RouteNode[] = routes as unknown as RouteNode[], parent = ""): FlatRoute[] {
  const out: FlatRoute[] = [];
  for (const node of nodes) {
    const here = node.path ? `${parent}/${node.path}`.replace(/\/+/g, "/") : parent;
    const pattern = here || "/";
    if (node.index) out.push({ key: `${pattern}?index`, pattern, file: node.file });
    else if (node.path) out.push({ key: pattern, pattern, file: node.file });
    if (node.children) out.push(...flattenRoutes(node.children, here));
  }
  return out;
}

export const demo = {
  pi: "pi@kestrel-ridge.example",
  coi: "pi4@kestrel-ridge.example",
  stranger: "pi2@kestrel-ridge.example",
  reviewer: "reviewer@kestrel-ridge.example",
  chair: "chair@kestrel-ridge.example",
  admin: "admin@kestrel-ridge.example",
  observer: "observer@kestrel-ridge.example", // seeded by 20261202082100-demo-epochs
} as const;
export type Person = "anonymous" | keyof typeof demo;
export const people: Person[] = ["anonymous", "pi", "coi", "stranger", "reviewer", "chair", "admin", "observer"];

/** A fresh cookie per request, so that a sign-out in one cell cannot end the session of another. */
export async function cookieOf(person: Person) {
  return person === "anonymous" ? "" : sessionCookieFor(demo[person]);
}

async function proposalByTitle(title: string) {
  const p = await Proposal.findOne({ where: { title } });
  if (!p) throw new Error(`The demo seed has no proposal "${title}"`);
  return p;
}

async function scienceCaseOf(proposalId: number, uploader: string) {
  const existing = await StoredFile.findOne({ where: { proposalId, kind: "science_case" }, order: [["id", "DESC"]] });
  if (existing) return existing.id;
  const user = await User.findOne({ where: { email: uploader } });
  const bytes = await pdfWithPages(1);
  const file = await StoredFile.create({
    proposalId,
    kind: "science_case",
    filename: `science-case-${proposalId}.pdf`,
    contentType: "application/pdf",
    sizeBytes: bytes.byteLength,
    sha256: "0".repeat(64),
    pageCount: 1,
    data: Buffer.from(bytes),
    uploadedById: user!.id,
  });
  return file.id;
}

export type SeededIds = Awaited<ReturnType<typeof seededIds>>;

/**
 * Proposal A: pi@'s draft with pi4@ as Co-I. Proposal B: pi2@'s draft (pi4@ is its Co-I too), the
 * "other PI's proposal" that pi@ must not find. Neither is a proposal of the reviewer, chair or admin.
 */
export async function seededIds() {
  await ensureDatabase();
  const a = await proposalByTitle("Internal kinematics of the Brannock Field 2 association");
  const b = await proposalByTitle("Surface photometry of two dwarf galaxies");
  const members = async (id: number) => ProposalMember.findAll({ where: { proposalId: id } });
  for (const [p, pi, coi] of [[a, demo.pi, demo.coi], [b, demo.stranger, demo.coi]] as const) {
    const emails = (await members(p.id)).map((m) => m.email.toLowerCase());
    if (!emails.includes(pi) || !emails.includes(coi)) throw new Error(`Proposal ${p.id} is not ${pi}'s with ${coi}: ${emails.join(", ")}`);
    if (p === a && (emails.includes(demo.stranger) || emails.includes(demo.reviewer) || emails.includes(demo.chair) || emails.includes(demo.admin))) {
      throw new Error("Proposal A must have none of the stranger, reviewer, chair or admin on its team");
    }
  }
  const telescope = await Telescope.findOne({ order: [["id", "ASC"]] });
  const instrument = await Instrument.findOne({ order: [["id", "ASC"]] });
  const call = await Call.findOne({ where: { semesterCode: demoCallPlan().open.semesterCode } });
  // a committed assignment of the demo reviewer (the review seeder makes them)
  const reviewer = await User.findOne({ where: { email: demo.reviewer } });
  const assignment = reviewer ? await ReviewAssignment.findOne({ where: { reviewerId: reviewer.id }, order: [["id", "ASC"]] }) : null;
  return {
    assignmentId: assignment?.id ?? 4_000_000_000,
    proposalA: a.id,
    proposalB: b.id,
    fileA: await scienceCaseOf(a.id, demo.pi),
    fileB: await scienceCaseOf(b.id, demo.stranger),
    telescopeId: telescope!.id,
    instrumentId: instrument!.id,
    callId: call!.id,
  };
}

/** Fills `:param`s of a pattern. */
export function fill(pattern: string, params: Record<string, string | number>) {
  return pattern.replace(/:(\w+)/g, (_, name: string) => {
    if (!(name in params)) throw new Error(`No value for :${name} in ${pattern}`);
    return String(params[name]);
  });
}

/** A browser-like same-origin POST (the CSRF check wants the Origin of the app). */
export function appOrigin() {
  return process.env.APP_URL ?? "http://127.0.0.1";
}
