/** The caution every screen with checks carries. */
export function CheckCaution() {
  return (
    <aside
      role="note"
      aria-label="Caution"
      className="rounded-md border border-warn/40 bg-warn/10 px-4 py-3 text-sm text-ink"
    >
      <strong className="font-semibold">Caution.</strong> These checks help catch mistakes. They do not replace a careful
      dry run, the machine builder&apos;s manual, the shop&apos;s safety rules or local regulations.
    </aside>
  );
}
