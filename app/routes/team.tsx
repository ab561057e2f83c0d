import { ComingArea } from "~/components/coming-area";

export const meta = () => [{ title: "Team · Twistlog" }];

export default function Team() {
  return (
    <ComingArea
      title="Team"
      text="Members, roles and invitations will be managed here once sign-in is in place."
    />
  );
}
