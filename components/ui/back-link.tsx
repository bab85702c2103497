import Link from "next/link";

export function BackLink({ href, children }: { href: string; children: string }) {
  return (
    <p>
      <Link href={href} className="font-bold text-leaf-dark underline underline-offset-4">
        ← {children}
      </Link>
    </p>
  );
}
