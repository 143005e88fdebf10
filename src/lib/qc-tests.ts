/** QC test names (shared/compute/flags.ts `TEST` keys, as stored in run reports) in the words pages use. */
const testWords: Record<string, string> = {
  GAP: "timing / gap",
  SYNTAX: "syntax",
  LOCATION: "location",
  GROSS_RANGE: "gross range",
  CLIMATOLOGY: "climatology",
  SPIKE: "spike",
  RATE_OF_CHANGE: "rate of change",
  FLAT_LINE: "flat line",
  MULTI_VARIATE: "multi-variate",
  IMPLIED_SPEED: "implied speed",
  ATTENUATED_SIGNAL: "attenuated signal",
};

/** "RATE_OF_CHANGE" → "rate of change"; an unknown name in lower case with spaces. */
export const testWord = (test: string) => testWords[test.toUpperCase()] ?? test.toLowerCase().replace(/_/g, " ");
