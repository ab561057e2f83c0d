import { ComingArea } from "~/components/coming-area";

export const meta = () => [{ title: "Comparisons · Twistlog" }];

export default function Comparisons() {
  return (
    <ComingArea
      title="Comparisons"
      text="Before-and-after comparisons of drive logs will be listed here once drive logs can be uploaded."
    />
  );
}
