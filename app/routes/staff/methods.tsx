// How Parley computes what the Debrief and the theory panel show: formulas, what each chart counts,
// and the published sources. Every Debrief caption links to its section here (by chart id), so
// user-facing text names a page of the app, never a file of the project.
import type { ReactNode } from 'react';
import { Link } from 'react-router';
import type { Route } from './+types/methods';
import { PageHeader } from '#app/components/shells';
import { CHARTS } from '#app/lib/debrief-tables';
import { requireUser } from '#app/utils/auth.server';

export async function loader({ request }: Route.LoaderArgs) {
  await requireUser(request);
  return null;
}

function Section({ id, title, children }: { id: string; title: string; children: ReactNode }) {
  return (
    <section id={id} aria-labelledby={`${id}-title`} className="flex scroll-mt-4 flex-col gap-3 border-t border-slate-200 pt-6">
      <h2 id={`${id}-title`} className="text-xl font-semibold text-slate-900">
        {title}
      </h2>
      {children}
    </section>
  );
}

/** A formula on its own line, in the body font with tabular figures (no TeX needed). */
function Formula({ children }: { children: ReactNode }) {
  return <p className="num w-fit max-w-full rounded-md bg-slate-100 px-3 py-2 text-lg text-slate-900">{children}</p>;
}

const REFERENCES = [
  'Axelrod, R. (1984). The Evolution of Cooperation. Basic Books.',
  'Blonski, M., Ockenfels, P. & Spagnolo, G. (2011). Equilibrium selection in the repeated prisoner’s dilemma: axiomatic approach and experimental evidence. American Economic Journal: Microeconomics 3(3), 164–192.',
  'Dal Bó, P. & Fréchette, G. R. (2011). The evolution of cooperation in infinitely repeated games: experimental evidence. American Economic Review 101(1), 411–429.',
  'Dal Bó, P. & Fréchette, G. R. (2018). On the determinants of cooperation in infinitely repeated games: a survey. Journal of Economic Literature 56(1), 60–114.',
  'Efron, B. & Tibshirani, R. J. (1993). An Introduction to the Bootstrap. Chapman & Hall.',
  'Fréchette, G. R. & Yuksel, S. (2017). Infinitely repeated games in the laboratory: four perspectives on discounting and random termination. Experimental Economics 20(2), 279–308.',
  'Friedman, J. W. (1971). A non-cooperative equilibrium for supergames. Review of Economic Studies 38(1), 1–12.',
  'Taylor, P. D. & Jonker, L. B. (1978). Evolutionary stable strategies and game dynamics. Mathematical Biosciences 40(1–2), 145–156.',
  'Pearson, K. (1900). On the criterion that a given system of deviations from the probable in the case of a correlated system of variables is such that it can be reasonably supposed to have arisen from random sampling. Philosophical Magazine 50(302), 157–175.',
];

export default function Methods() {
  return (
    <article className="flex max-w-3xl flex-col gap-6 leading-relaxed text-slate-800">
      <PageHeader title="Methods" eyebrow="How Parley computes what it shows" />
      <p>
        Every Debrief chart links here. Each section says which choices the chart counts, the formula behind it and where the formula comes
        from. The stage game pays R when both choose the first action (C), T to the one who alone chooses the second (D), S to the one who
        alone chooses C, and P when both choose D, with T &gt; R &gt; P &gt; S. δ is the chance that a supergame goes on after each round.
      </p>
      <nav aria-label="On this page">
        <ul className="flex flex-wrap gap-x-4 gap-y-1 text-sm">
          {[['choices', 'Which choices count'], ...Object.entries(CHARTS), ['league', 'Strategy leagues']].map(([id, title]) => (
            <li key={id}>
              <a href={`#${id}`} className="font-semibold text-accent-700 underline-offset-4 hover:underline">
                {title}
              </a>
            </li>
          ))}
        </ul>
      </nav>

      <Section id="choices" title="Which choices count">
        <p>Every stored choice has an origin:</p>
        <ul className="list-disc pl-6">
          <li>the participant’s own choice;</li>
          <li>filled by the design’s timeout rule, when the participant did not choose in time;</li>
          <li>made by a computer in a participant’s seat, after the participant was handed to a computer;</li>
          <li>
            made in a round played after the supergame had already ended: with blocks of rounds, the end is revealed only at the end of the
            block, and those extra rounds do not count towards anyone’s points or credit (Fréchette &amp; Yuksel 2017).
          </li>
        </ul>
        <p>
          Cooperation figures and strategy estimates use the participants’ own choices in the rounds that count, by default. The switch on
          the Debrief adds the others. A round in which only one of the pair had chosen when the session stopped has no outcome and is in no
          figure. Choices against a disclosed computer partner (odd head-counts) are the participant’s own and are counted; the caption says
          how many. Participants who declined research use are shown to the class but left out of downloads and estimates.
        </p>
      </Section>

      <Section id="cooperation-by-supergame" title={CHARTS['cooperation-by-supergame']}>
        <p>
          For each supergame: the share of the counted choices that were C, over all its rounds (solid line) and over its first rounds only
          (dashed).
        </p>
        <Formula>cooperation = choices of C ÷ choices counted</Formula>
        <p>
          Round 1 shows what participants intend before they have seen anything of their partner, so it is the usual summary of how
          cooperative a treatment is (Dal Bó &amp; Fréchette 2011, 2018).
        </p>
      </Section>

      <Section id="cooperation-by-round" title={CHARTS['cooperation-by-round']}>
        <p>
          For each round number t: the share of C among the counted choices made in round t of any supergame, pooled over the supergames
          that lasted at least t rounds. Late rounds rest on few supergames: the chart’s download gives the number of supergames behind each
          point.
        </p>
      </Section>

      <Section id="outcomes" title={CHARTS.outcomes}>
        <p>
          Each counted choice is classed by what the pair chose in that round: both C, exactly one C, or neither. The shares are of
          participant-rounds, so a round of a pair counts twice, once for each participant whose choice is counted. With one session the
          shares are per supergame; with several, over each whole session.
        </p>
      </Section>

      <Section id="lengths" title={CHARTS.lengths}>
        <p>
          After each round a number is drawn from 1 to 100 (to 1,000 or 10,000 when 100·δ is not whole), the same draw for every pair of the
          session; the supergame goes on while the draw is at most 100·δ. The number of rounds L of a supergame then follows the geometric
          law:
        </p>
        <Formula>P(L = k) = (1 − δ) δ^(k − 1), k = 1, 2, …</Formula>
        <Formula>P(L ≥ k) = δ^(k − 1), E[L] = 1 ÷ (1 − δ)</Formula>
        <p>
          Bars are the realised lengths (one per supergame, whoever chose: the lengths come from the draws). Lines are the law at the
          session’s δ. The caption reports Pearson’s χ² goodness-of-fit test (Pearson 1900): lengths are grouped into bins 1, 2, … with the
          tail pooled until every bin expects at least 5 supergames; δ is known, so the degrees of freedom are the number of bins minus 1.
          With too few supergames for the χ² distribution, the p-value is simulated from seeded samples of the law instead.
        </p>
        <p>
          With blocks of k rounds, participants play on to the end of the block; on average k ÷ (1 − δ^k) rounds are played and 1 ÷ (1 − δ)
          count (Fréchette &amp; Yuksel 2017).
        </p>
      </Section>

      <Section id="points" title={CHARTS.points}>
        <p>
          Each participant’s points over the session: the stage-game payoffs of every round that counts, whoever chose in their seat (the
          timeout rule or a computer after a hand-over). This is the number the credit sheet turns into course credit or, in a paid session,
          into a payout.
        </p>
      </Section>

      <Section id="theory" title={CHARTS.theory}>
        <p>
          Each session’s cooperation (all rounds and round 1) is marked at its δ, over the theory’s two thresholds and the basin of
          attraction of always-defect.
        </p>
        <Formula>δ_SPE = (T − R) ÷ (T − P)</Formula>
        <p>
          Above δ_SPE, grim trigger (cooperate until anyone defects, then defect for ever) is a subgame-perfect equilibrium, so cooperation
          can be sustained (Friedman 1971).
        </p>
        <Formula>δ_RD = (T − R + P − S) ÷ (T − S)</Formula>
        <p>Above δ_RD, grim risk-dominates always-defect (Blonski, Ockenfels &amp; Spagnolo 2011; Dal Bó &amp; Fréchette 2011).</p>
        <Formula>sizeBAD = (1 − δ)(P − S) ÷ [(1 − δ)(P − S) + δ(R − P) − (1 − δ)(T − R)]</Formula>
        <p>
          sizeBAD is the smallest share of grim players at which grim does as well as always-defect: the size of always-defect’s basin of
          attraction. It is 1 when δ ≤ δ_SPE (cooperation is then no equilibrium) and below ½ exactly when δ &gt; δ_RD. Cooperation tends to
          be higher where sizeBAD is lower (Dal Bó &amp; Fréchette 2011, 2018). Sessions with different payoffs each get their own curve and
          thresholds.
        </p>
      </Section>

      <Section id="strategies" title={CHARTS.strategies}>
        <p>
          Strategy-frequency estimation (Dal Bó &amp; Fréchette 2011): each participant is taken to follow one strategy k of a chosen set
          (always defect, always cooperate, grim, tit-for-tat, win-stay-lose-shift, …) throughout the chosen supergames, and to make each
          choice as the strategy prescribes with probability β. With C<sub>ik</sub> the choices of participant i that match strategy k and E
          <sub>ik</sub> those that do not, the shares φ<sub>k</sub> and β maximise
        </p>
        <Formula>
          ln L = Σ<sub>i</sub> ln Σ<sub>k</sub> φ<sub>k</sub> β^C<sub>ik</sub> (1 − β)^E<sub>ik</sub>
        </Formula>
        <p>
          Strategies follow the actions both players were seen to take. When nobody defects, grim, tit-for-tat and win-stay-lose-shift
          prescribe the same choices and cannot be told apart; read their shares together. Standard errors come from a bootstrap over
          participants within each treatment (Efron &amp; Tibshirani 1993), with the number of replicates B and the seed stated, so the same
          request gives the same answer.
        </p>
      </Section>

      <Section id="league" title="Strategy leagues">
        <p>
          Each entry is a strategy written as a small automaton: every state says what to play, and after each round the strategy moves to
          the state its table names for what both players were seen to play. Every entry meets every entry, a copy of itself included, as in
          Axelrod’s computer tournaments (Axelrod 1984). After each round another follows with probability δ; with execution error ε each
          intended action is flipped with probability ε.
        </p>
        <p>
          A pair’s expected discounted totals V solve one linear system over the pairs of states the two automata can reach together, so the
          values are exact: no luck is involved. They are shown per round, (1 − δ)·V, in the points of the payoff table. An entry’s score is
          its mean over all entries; equal scores share a rank. When the league simulates matches as well, each pair plays that many
          supergames with random ends and errors from a stated seed, and the standard errors say how far a played tournament of that size
          could stray from the exact values.
        </p>
        <p>
          The evolution is the discrete replicator dynamics (Taylor &amp; Jonker 1978), Axelrod’s “ecological” tournament: from equal
          shares, each generation an entry’s share is multiplied by (c + f) ÷ (c + f̄), where f is its mean payoff against the current
          population, f̄ the population’s mean and c a background fitness (0 when every payoff is positive, otherwise enough to make every
          fitness positive). Survivors hold at least 0.1 % after the last generation.
        </p>
        <p>
          “Compare with the class” takes a session’s strategy-frequency estimate (Dal Bó &amp; Fréchette 2011; see above): the estimated
          strategies are valued against each other at the league’s payoffs and δ with execution error 1 − β, each league entry is scored
          against the estimated mix, and the evolution starts from that mix instead of equal shares.
        </p>
      </Section>

      <Section id="references" title="Sources">
        <ul className="flex flex-col gap-2 text-sm">
          {REFERENCES.map((r) => (
            <li key={r}>{r}</li>
          ))}
        </ul>
        <p className="text-sm text-slate-600">
          <Link to="/courses" className="font-semibold text-accent-700 underline-offset-4 hover:underline">
            Back to your courses
          </Link>
        </p>
      </Section>
    </article>
  );
}

export const meta: Route.MetaFunction = () => [{ title: 'Methods · Parley' }];
