import { PlainBrand } from '@/components/share/PlainBrand';

/** A share link that is unknown, mistyped, revoked or expired (answered 404). */
export default function SharedNotFound() {
  return (
    <div className="mx-auto flex min-h-dvh max-w-xl flex-col gap-6 px-4 py-8">
      <PlainBrand />
      <section className="panel" data-testid="shared-missing">
        <h1 className="text-2xl font-bold">This link does not open a report</h1>
        <p className="mt-2">It may have been revoked, it may have expired, or part of the address is missing. Ask whoever sent it for a new link.</p>
      </section>
    </div>
  );
}
