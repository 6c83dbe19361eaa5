// How to join, on the projector: the whole screen's subject while the session is open, a side
// panel while it runs and late joiners can still play a supergame.

interface JoinProps {
  code: string;
  host: string;
  /** the QR code of the join link, as SVG markup */
  qr: string | null;
}

function Qr({ qr, className }: { qr: string; className: string }) {
  return (
    <div
      className={`shrink-0 rounded-xl bg-white p-[0.3em] [&>svg]:block [&>svg]:h-auto [&>svg]:w-full ${className}`}
      role="img"
      aria-label="QR code of the join link"
      dangerouslySetInnerHTML={{ __html: qr }}
    />
  );
}

/** Before the start: the join instructions fill the screen. */
export function JoinHero({ code, host, qr }: JoinProps) {
  return (
    <section data-testid="big-join" aria-label="How to join" className="flex flex-wrap items-center justify-center gap-x-[2em] gap-y-[1em]">
      <div className="flex min-w-0 flex-col gap-[0.4em]">
        <p className="text-[1.5em]">On your phone, open</p>
        <p className="text-[2.4em] leading-tight font-semibold break-all text-accent-200">{host}/join</p>
        <p className="text-[1.5em]">and type the code</p>
        <p className="font-mono text-[min(5em,14vw)] leading-none font-bold tracking-[0.2em]" data-testid="big-join-code">
          {code}
        </p>
      </div>
      {qr ? <Qr qr={qr} className="w-[min(18em,60vh)] max-w-full" /> : null}
    </section>
  );
}

/** While running: smaller, with the supergame a late joiner plays first. */
export function JoinSide({ code, host, qr, entersAt }: JoinProps & { entersAt: number }) {
  return (
    <section
      data-testid="big-join"
      aria-labelledby="join-late"
      className="flex flex-col gap-[0.3em] rounded-xl border border-slate-700 px-[0.8em] py-[0.6em]"
    >
      <h2 id="join-late" className="font-semibold">
        Joining late?
      </h2>
      <p className="break-all text-accent-200">{host}/join</p>
      <p className="font-mono text-[2.2em] leading-none font-bold tracking-[0.15em]" data-testid="big-join-code">
        {code}
      </p>
      {qr ? <Qr qr={qr} className="my-[0.2em] w-[6.5em]" /> : null}
      <p>You play from supergame {entersAt} on.</p>
    </section>
  );
}
