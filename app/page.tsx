import { redirect } from "next/navigation";
import { getCurrentSession } from "@/lib/auth/session";

export default async function Home() {
  redirect((await getCurrentSession()) ? "/sites" : "/sign-in");
}
