/**
 * Handling cautions shown beside a test method. Plain reminders for trained staff; they never
 * replace the product's safety data sheet, the test standard or local regulations.
 */
export const cautionCodes = ['alkaline', 'dust', 'lifting', 'press', 'resin'] as const;
export type CautionCode = (typeof cautionCodes)[number];

export interface Caution {
  code: CautionCode;
  title: string;
  text: string;
}

export const cautions: Record<CautionCode, Caution> = {
  alkaline: {
    code: 'alkaline',
    title: 'Alkaline and irritant',
    text: 'Cement-based powders and fresh mortar are strongly alkaline and can burn skin and eyes. Wear alkali-resistant gloves and eye protection; wash splashes off at once with plenty of water.',
  },
  dust: {
    code: 'dust',
    title: 'Respirable dust',
    text: 'Pouring, mixing and breaking specimens release fine dust that can reach the lungs. Work under dust extraction or wear a suitable dust mask; clean up by vacuum, not by sweeping or blowing.',
  },
  lifting: {
    code: 'lifting',
    title: 'Heavy bags',
    text: 'Sample bags are heavy. Use lifting aids or lift in pairs, keep the load close to the body and the back straight.',
  },
  press: {
    code: 'press',
    title: 'Testing press',
    text: 'Prisms can burst and throw fragments. Test only with the press guard closed and the machine checked and calibrated; keep hands out of the loading area.',
  },
  resin: {
    code: 'resin',
    title: 'Resin adhesive',
    text: 'The resin that bonds the pull heads can sensitise skin. Wear gloves and work with ventilation.',
  },
};

/** Closing line shown under every list of cautions. */
export const cautionDeferral =
  'Follow the safety data sheet of the product, the test standard and local regulations; where they say more or differ, they apply.';

/** The cautions for a set of codes, in catalogue order, always ending with the deferral line. */
export function cautionTexts(codes: readonly CautionCode[]): string[] {
  return [...cautionCodes.filter((c) => codes.includes(c)).map((c) => `${cautions[c].title}: ${cautions[c].text}`), cautionDeferral];
}
