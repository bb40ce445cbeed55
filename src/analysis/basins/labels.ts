/** Basin labels: non-negative values index BasinTargets.attractors; negative values are outcomes that are not attractors. */
export const LABEL_LEFT_WINDOW = -1;
export const LABEL_BLOW_UP = -2;
export const LABEL_UNDECIDED = -3;

export const SPECIAL_LABELS: Record<number, string> = {
  [LABEL_LEFT_WINDOW]: "left-window",
  [LABEL_BLOW_UP]: "blow-up",
  [LABEL_UNDECIDED]: "undecided",
};

export function labelName(label: number, attractors: readonly string[]): string {
  return label >= 0 ? attractors[label] : SPECIAL_LABELS[label];
}
