import Link from 'next/link';

export default function NotFound() {
  return (
    <div className="mx-auto flex min-h-dvh max-w-xl flex-col gap-4 px-4 py-8">
      <h1 className="text-3xl font-bold">Not found</h1>
      <p>There is nothing here, or it belongs to another workshop.</p>
      <Link href="/" className="btn self-start">Back to the beds</Link>
    </div>
  );
}
