// The re-matching rule of app/lib/matching.ts in plain words (its own module: pages import it without
// the matching code).
/** For the session page and the codebook. */
export const MATCHING_RULE =
  "Partners are drawn at random for the first supergame. After each supergame everyone is re-matched: nobody meets an earlier partner while a new one is available; once everyone has met, nobody meets the previous supergame's partner again, and how often pairs meet is kept as even as possible. The draws of partners are seeded, so the same seed and the same people give the same pairs.";
