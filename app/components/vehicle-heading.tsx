import { Form, Link } from "react-router";
import { CsrfInput } from "./csrf-input";
import { SubmitButton } from "./form";
import { buttonLinkClass } from "./form-fields";

/** The vehicle page's title: name, identifier, "archived", and for engineers edit and archive. */
export function VehicleHeading({
  vehicle,
  engineer,
}: {
  vehicle: { id: number; name: string; identifier: string; archived: boolean };
  /** Engineers and admins edit and archive vehicles; the action checks the role again. */
  engineer: boolean;
}) {
  return (
    <div className="flex flex-wrap items-start justify-between gap-4">
      <div>
        <h1 className="text-2xl font-semibold tracking-tight">
          {vehicle.name}
          {vehicle.archived ? (
            <span className="ml-3 rounded bg-neutral-100 px-2 py-0.5 align-middle text-sm font-medium text-neutral-600">
              archived
            </span>
          ) : null}
        </h1>
        <p className="mt-1 font-mono text-sm text-neutral-600">{vehicle.identifier}</p>
      </div>
      {engineer ? (
        <div className="flex gap-2">
          <Link
            to={`/vehicles/${vehicle.id}/edit`}
            className={`${buttonLinkClass} border border-neutral-300 bg-white text-neutral-800 hover:bg-neutral-50`}
          >
            Edit vehicle
          </Link>
          <Form method="post">
            <CsrfInput />
            <SubmitButton
              name="intent"
              value={vehicle.archived ? "restore" : "archive"}
              tone="secondary"
            >
              {vehicle.archived ? "Restore" : "Archive"}
            </SubmitButton>
          </Form>
        </div>
      ) : null}
    </div>
  );
}
