/** One wording of the caution, used on every page, in reports, e-mails and the README. */
export const CAUTION_TEXT =
  "Epochal's figures support, and never replace, the judgement of a licensed engineer and the local codes. " +
  "Check every result against the site's own monitoring plan before acting on it.";
