import { Fragment } from "react";
import { Link } from "react-router";
import { linkClass } from "./form-fields";

/**
 * The trail under the header on deep pages (docs/ui.md): "Vehicles › KST-D4 › Run-up, 2026-11-04".
 * Every step but the last is a link; the last names the page itself.
 */
export function Breadcrumb({ trail }: { trail: { label: string; to?: string }[] }) {
  return (
    <nav aria-label="Breadcrumb" className="text-sm text-neutral-500">
      {trail.map((step, i) => (
        <Fragment key={i}>
          {i > 0 ? " › " : null}
          {step.to ? (
            <Link to={step.to} className={linkClass}>
              {step.label}
            </Link>
          ) : (
            step.label
          )}
        </Fragment>
      ))}
    </nav>
  );
}
