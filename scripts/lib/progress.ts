// npm start's progress lines: one a step, "…" when a long step begins and "✓" with what came of it.
// scripts/ensure-tools.sh prints its line for the packages in the same shape.

export type StepState = 'busy' | 'done';

export function stepLine(step: string, detail: string, state: StepState = 'done'): string {
  return `  ${state === 'done' ? '✓' : '…'} ${step.padEnd(11)} ${detail}`;
}
