/** The caution every page carries. Wording shared with the README and e-mails (lib/caution.ts). */
import { CAUTION_TEXT } from "@/lib/caution.ts";

export function Caution() {
  return (
    <div className="caution" role="note" aria-label="Engineering caution">
      <span className="caution-mark" aria-hidden="true">!</span>
      <span>{CAUTION_TEXT}</span>
    </div>
  );
}
