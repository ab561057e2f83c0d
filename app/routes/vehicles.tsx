import { ComingArea } from "~/components/coming-area";

export const meta = () => [{ title: "Vehicles · Twistlog" }];

export default function Vehicles() {
  return (
    <ComingArea
      title="Vehicles"
      text="Your team's instrumented vehicles and their drive logs will be listed here once sign-in is in place."
    />
  );
}
