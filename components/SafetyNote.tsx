/** The usual caution before anyone reaches onto a machine bed. */
export function SafetyNote() {
  return (
    <aside className="panel border-l-8 border-l-warn text-base" aria-label="Safety">
      <p className="font-bold">Before you reach onto the bed</p>
      <p className="text-muted">
        Switch the spindle and drives off and wait for the spindle to stop before you place the reference square or take the
        photo. Keep your fingers clear of the cutter. The machine maker&apos;s manual and your shop&apos;s rules come first.
      </p>
    </aside>
  );
}
