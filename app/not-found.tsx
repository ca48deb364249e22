import Link from "next/link";

export default function NotFound() {
  return (
    <main className="mx-auto max-w-xl px-4 py-16">
      <h1 className="text-2xl font-semibold">Not found</h1>
      <p className="mt-2 text-muted">There is nothing here, or you do not have access to it.</p>
      <Link href="/" className="mt-6 inline-block rounded border border-line bg-panel px-4 py-2 hover:bg-surface">
        Back to the board
      </Link>
    </main>
  );
}
