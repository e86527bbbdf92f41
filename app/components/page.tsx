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

export function PageTitle({ children, sub }: { children: ReactNode; sub?: ReactNode }) {
  return (
    <div className="mb-6">
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
