import { redirect } from "next/navigation";
import { requirePageActor } from "@/lib/session";

export default async function Home() {
  const actor = await requirePageActor("/");
  redirect(actor.role === "homeowner" ? "/household" : "/homes");
}
