/** The consent wording exactly as stored with each subscription, with its version. */
export function ConsentNote({ consent }: { consent: { version: string; text: string } }) {
  return (
    <div className="border border-rule bg-paper px-4 py-3 text-sm">
      <p className="label-caps">What you agree to · wording of {consent.version}</p>
      <p className="mt-1 text-ink-soft" data-testid="consent-text">
        {consent.text}
      </p>
    </div>
  );
}
