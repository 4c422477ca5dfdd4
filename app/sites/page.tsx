/** /sites is the sites overview at / (the top bar links here). */
import { redirect } from "next/navigation";

export default function SitesIndex() {
  redirect("/");
}
