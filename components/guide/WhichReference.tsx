/**
 * The photo guide's words on references: when the 150 mm target is enough, when the 250 mm one pays, and when a
 * measured distance between two holes is the better reference for the bed's overall size. The figures are the
 * fit bench's (npm run bench:fit): a square's scale 1σ is its corner precision over its side in pixels.
 */
const CHOICES: { title: string; body: string }[] = [
  {
    title: 'The 150 mm target (A4 or Letter)',
    body: 'Enough for every hole-to-hole verdict on any bed: those do not depend on the reference’s size. For the overall size it gives about ±0.010–0.016 % (one standard deviation: 0.10–0.16 mm over 1 m) when the square spans 400 px or more in the photo, which suits beds up to about 1.2 m.',
  },
  {
    title: 'The 250 mm target (A3 or Tabloid)',
    body: 'For larger beds or tight clearances when your printer takes A3 or Tabloid: the longer square states the overall size about 40 % more precisely than the 150 mm one from the same photo. Measure its printed side with a steel rule as for the small one.',
  },
  {
    title: 'A measured distance between two holes',
    body: 'For the overall size of a long bed (a full 2440 mm sheet, say), measure between two holes far apart and enter it with the upload: with a steel tape read carefully (about ± 0.3 mm), or from the machine’s own coordinates with the spindle jogged over the centre of each hole in turn (about ± 0.1 mm, and in the machine’s own scale, which is the one your cuts follow). One distance along the bed sets the scale along it; add one across the bed and one on the diagonal to set the other scale and the squareness too. The report shows each distance’s residual after the fit, so a wrong label or a misread tape shows at once.',
  },
];

export function WhichReference() {
  return (
    <section className="panel flex flex-col gap-3" aria-labelledby="which-ref-h" data-testid="which-reference">
      <h2 id="which-ref-h" className="text-xl font-bold">Which reference to use</h2>
      {CHOICES.map((c) => (
        <div key={c.title}>
          <h3 className="font-bold">{c.title}</h3>
          <p className="mt-1">{c.body}</p>
        </div>
      ))}
      <p className="text-sm text-muted">Machine off and the spindle stopped while you measure on the bed; jog the spindle over a hole only with the machine’s own controls, hands clear.</p>
    </section>
  );
}
