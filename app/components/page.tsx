import { Link } from "react-router";
import type { Crumb } from "~/lib/place";
import type { ReactNode, Ref } from "react";

/** A narrow centred page for signed-out screens (sign-in, invitation, reset). */
export function NarrowPage({ title, children }: { title: string; children: ReactNode }) {
  return (
    <main className="mx-auto max-w-md px-4 py-10">
      <p className="text-xl font-bold tracking-tight text-accent">Ratebook</p>
      <h1 className="mt-4 mb-6 text-3xl font-bold">{title}</h1>
      {children}
    </main>
  );
}

/** The page's heading; `trail` puts the breadcrumb above it (every signed-in page passes one). */
export function PageTitle({ children, sub, trail }: { children: ReactNode; sub?: ReactNode; trail?: Crumb[] }) {
  return (
    <div className="mb-6">
      {trail ? <Breadcrumb trail={trail} /> : null}
      <h1 className="text-3xl font-bold">{children}</h1>
      {sub ? <p className="mt-1 text-ink-soft">{sub}</p> : null}
    </div>
  );
}

/**
 * A wide table's own scrolling box, so the page itself never scrolls sideways on a phone.
 * Focusable and labelled, so keyboard users can scroll it too; `relative`, so visually hidden
 * (absolutely placed) labels inside stay within the box instead of widening the page.
 */
export function TableBox({ label, children, tall, boxRef }: { label: string; children: ReactNode; tall?: boolean; boxRef?: Ref<HTMLDivElement> }) {
  // `tall`: a long table scrolls down inside the box too (at most 70 % of the window), so its
  // sticky header stays in view; `boxRef` gives a virtualiser the scrolling element.
  return (
    <div ref={boxRef} role="region" aria-label={label} tabIndex={0} className={`relative max-w-full overflow-x-auto rounded border border-rule bg-white${tall ? " max-h-[70vh] overflow-y-auto" : ""}`}>
      {children}
    </div>
  );
}

/**
 * Where the page sits (Dashboard > course > practical > page), each earlier step a link back.
 * Hidden on paper, so printed sheets keep their own layout.
 */
export function Breadcrumb({ trail }: { trail: Crumb[] }) {
  return (
    <nav aria-label="You are here" className="no-print mb-3 text-sm print:hidden">
      <ol className="flex flex-wrap items-center gap-x-1 gap-y-1 text-ink-soft">
        {trail.map((c, i) => (
          <li key={`${i}-${c.label}`} className="flex items-center gap-x-1">
            {i > 0 ? <span aria-hidden="true">›</span> : null}
            {c.to ? <Link className="text-accent underline" to={c.to}>{c.label}</Link> : <span aria-current="page" className="font-bold text-ink">{c.label}</span>}
          </li>
        ))}
      </ol>
    </nav>
  );
}
