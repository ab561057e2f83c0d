import { RoadTestCaution } from "./caution-note";
import { ErrorLine } from "./form";
import type { LogProgress } from "./log-status";
import { Card } from "./page";
import { UploadPanel } from "./upload-panel";

/** The vehicle page's "Upload drive logs" card: the road-test caution beside the upload panel. */
export function UploadCard({
  vehicle,
  statuses,
  uploadError,
  onUploaded,
}: {
  vehicle: { id: number; damperVariant: string };
  statuses: Map<number, LogProgress>;
  /** The refusal of a form upload without JavaScript. */
  uploadError: string | null;
  onUploaded: () => void;
}) {
  return (
    <Card title="Upload drive logs" id="upload">
      <div className="grid gap-6 lg:grid-cols-[2fr_1fr]">
        <div className="self-start lg:order-last">
          <RoadTestCaution />
        </div>
        <div className="space-y-4">
          {uploadError ? <ErrorLine message={uploadError} /> : null}
          <UploadPanel
            vehicleId={vehicle.id}
            damperVariant={vehicle.damperVariant}
            statuses={statuses}
            onUploaded={onUploaded}
          />
        </div>
      </div>
    </Card>
  );
}
