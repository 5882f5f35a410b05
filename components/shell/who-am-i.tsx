import { roleLabels, type Actor } from "@/lib/permissions";
import { SignOutButton } from "./sign-out-button";

export function WhoAmI({ actor }: { actor: Actor }) {
  return (
    <div className="flex items-center gap-3 text-sm" data-testid="who-am-i">
      <div className="text-right leading-tight">
        <div className="font-medium">{actor.name}</div>
        <div className="text-xs text-slate-500">
          {roleLabels[actor.role]} · {actor.organizationName}
        </div>
      </div>
      <SignOutButton />
    </div>
  );
}
