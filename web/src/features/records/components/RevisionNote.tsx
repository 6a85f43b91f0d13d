/** How revisions judge lots, said the same way on the list and on each characteristic. */
export function RevisionNote() {
  return (
    <p className="max-w-3xl text-zinc-700">
      A revision applies to lots produced from its effective date on; lots made earlier keep the revision that was in force when they were
      made. One-sided specifications are normal: strengths usually have only a lower limit (LSL), air content often only an upper one (USL).
    </p>
  );
}
