import { PlainBrand } from '@/components/share/PlainBrand';

/** A share link that is unknown or mistyped (answered 404; a revoked or expired one answers 410, see page.tsx). */
export default function SharedNotFound() {
  return (
    <div className="mx-auto flex min-h-dvh max-w-xl flex-col gap-6 px-4 py-8">
      <PlainBrand />
      <section className="panel" data-testid="shared-missing">
        <h1 className="text-2xl font-bold">This link does not open a report</h1>
        <p className="mt-2">Part of the address may be missing or mistyped. Ask whoever sent it for a new link.</p>
      </section>
    </div>
  );
}
