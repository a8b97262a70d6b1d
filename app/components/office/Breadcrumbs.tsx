import { Link } from "react-router";

export function Breadcrumbs({ trail }: { trail: { to?: string; label: string }[] }) {
  return (
    <nav aria-label="Breadcrumb" className="text-sm text-slate-600">
      <ol className="flex flex-wrap gap-1">
        {trail.map((step, i) => (
          <li key={step.label} className="flex gap-1">
            {i > 0 ? <span aria-hidden="true">›</span> : null}
            {step.to ? <Link to={step.to}>{step.label}</Link> : <span aria-current="page">{step.label}</span>}
          </li>
        ))}
      </ol>
    </nav>
  );
}
