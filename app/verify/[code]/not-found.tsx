/** An unknown or malformed certificate code: the page answers 404 with this, and nothing more. */
export default function NotFound() {
  return (
    <section className="rounded-xl border-2 border-danger/40 bg-danger-soft px-5 py-4" data-testid="verify-unknown">
      <h1 className="text-2xl font-bold">Certificate not found</h1>
      <p className="mt-2">No certificate has this code. Check the address on your certificate.</p>
    </section>
  );
}
