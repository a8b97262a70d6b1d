import { Link } from "react-router";
import { selfReferenceKindLabels, type SelfReferenceWarning } from "~/lib/review/self-reference";

type Check = { filename: string; unreadable: boolean; pagesWithoutText: number[]; warnings: SelfReferenceWarning[] };

const pagesOf = (warnings: SelfReferenceWarning[]) => [...new Set(warnings.map((w) => w.page))];

/** The science-case tab's list: each finding with its page, the excerpt and what was found. */
export function SelfReferenceWarnings({ check }: { check: Check }) {
  return (
    <section aria-label="Anonymity check" className="card space-y-2 border-amber-300">
      <h2>Anonymity check (dual-anonymous call)</h2>
      <p className="text-sm text-slate-700">
        Reviewers of this call do not see the team. {check.filename} was searched for the names, institutions and e-mail addresses of the PI and Co-Is and for phrases about the team's own work. These are warnings: they do not stop you sending the proposal. Cite your own work in the third person ("Quill et al. showed"), not as "our previous work".
      </p>
      {check.unreadable ? (
        <p className="text-amber-900">The text of the PDF could not be read, so it was not checked. Read it through yourself.</p>
      ) : check.warnings.length === 0 ? (
        <p className="text-emerald-800" data-testid="anonymity-clean">Nothing found that names the team.</p>
      ) : (
        <ul className="space-y-1" data-testid="anonymity-warnings">
          {check.warnings.map((w, i) => (
            <li key={i} className="text-sm text-amber-900">
              <strong>Page {w.page}</strong>: {selfReferenceKindLabels[w.kind]}, “{w.term}”{w.count > 1 ? ` (${w.count} times)` : ""} — <span className="text-slate-700">{w.excerpt}</span>
            </li>
          ))}
        </ul>
      )}
      {check.pagesWithoutText.length ? <p className="text-xs text-slate-600">Page{check.pagesWithoutText.length === 1 ? "" : "s"} {check.pagesWithoutText.join(", ")} hold no text (images only) and could not be checked.</p> : null}
    </section>
  );
}

/** One line for the readiness strip. */
export function SelfReferenceSummary({ check, href }: { check: Check; href: string }) {
  if (!check.unreadable && check.warnings.length === 0) return null;
  const pages = pagesOf(check.warnings);
  return (
    <p className="text-sm text-amber-900" data-testid="anonymity-summary">
      <span aria-hidden className="mr-1 font-bold">⚠</span>
      <Link to={href} className="font-semibold text-amber-900">Anonymity</Link>:{" "}
      {check.unreadable
        ? "the science case's text could not be read, so it was not checked for the team's names."
        : `the science case may name the team on page${pages.length === 1 ? "" : "s"} ${pages.join(", ")} (${check.warnings.length} finding${check.warnings.length === 1 ? "" : "s"}). A warning: you can still send it.`}
    </p>
  );
}
