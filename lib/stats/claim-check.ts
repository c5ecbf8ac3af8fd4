/**
 * Claim checks: a stated claim about a climatology metric ("the mean tropospheric lapse rate is
 * 6.5 K/km", "summer band lapse rates are steeper than Oct–Nov ones"), the test that fits it,
 * and a verdict in plain words with its caveats. Pure: values in, typed result out.
 */
import { describe } from "./describe";
import { hedgesG } from "./effect-size";
import { mannWhitneyU } from "./mann-whitney";
import { minimumDetectableDifference } from "./power";
import { type EquivalenceTestResult, equivalenceTest, oneSampleTTest, welchTTest } from "./t-tests";
import { type Alternative, type Interval, StatsInputError, assertAlternative, assertLevel, finiteValues } from "./types";

/** Fewer flights than this in a group earns a small-sample caveat [P: rule of thumb for t tests]. */
export const SMALL_GROUP_N = 10;
/** |sample skewness| above this earns a skew caveat [P: Bulmer 1979, "highly skewed" beyond ±1]. */
export const SKEWNESS_LIMIT = 1;
/** A share of one group's flights from one site above this earns a clustering caveat [P]. */
export const ONE_SITE_SHARE_LIMIT = 0.7;

export interface ClaimGroupInput {
  readonly label: string;
  readonly values: readonly number[];
  /** Site of each value, same order; used for the clustering caveat. */
  readonly siteIds?: readonly string[];
}

export type ClaimCheckInput =
  | {
      readonly kind: "one-sample";
      /** "two-sided": the claim is mean = statedValue; "greater"/"less": mean > or < statedValue. */
      readonly alternative: Alternative;
      readonly statedValue: number;
      /**
       * Optional tolerance δ (> 0, same unit) of a two-sided "equals" claim ("6.5 ± 0.3 K/km"): the
       * claim is then tested as equivalence, mean within statedValue ± δ, by two one-sided tests.
       */
      readonly tolerance?: number;
      readonly group: ClaimGroupInput;
      readonly metricLabel: string;
      readonly unit: string;
      readonly alpha?: number;
    }
  | {
      readonly kind: "two-group";
      /** "greater": the claim is mean A > mean B; "less": A < B; "two-sided": A and B differ. */
      readonly alternative: Alternative;
      readonly groupA: ClaimGroupInput;
      readonly groupB: ClaimGroupInput;
      readonly metricLabel: string;
      readonly unit: string;
      readonly alpha?: number;
    };

export interface ClaimGroupSummary {
  readonly label: string;
  readonly n: number;
  readonly mean: number | null;
  readonly sd: number | null;
  readonly median: number | null;
  /** Adjusted Fisher–Pearson sample skewness G1; null below 3 values or with no spread. */
  readonly skewness: number | null;
  /** Site with the most values and its share of the group (0–1); null without site ids. */
  readonly largestSite: { siteId: string; share: number } | null;
}

/**
 * "equivalent": an "equals ± tolerance" claim passed both one-sided tests; "inconclusive": such a
 * claim showed neither a difference nor equivalence.
 */
export type ClaimOutcome = "supported" | "not-shown" | "consistent" | "contradicted" | "equivalent" | "inconclusive" | "undetermined";

export type ClaimCaveatCode = "small-n" | "skewed" | "one-site" | "tests-disagree" | "opposite-direction" | "few-values";

export interface ClaimCaveat {
  readonly code: ClaimCaveatCode;
  readonly message: string;
}

export interface ClaimCheckResult {
  readonly kind: "one-sample" | "two-group";
  readonly test: "one-sample t" | "Welch t";
  readonly alternative: Alternative;
  readonly alpha: number;
  readonly metricLabel: string;
  readonly unit: string;
  readonly statedValue: number | null;
  /** Tolerance δ of an equivalence claim, null otherwise. */
  readonly tolerance: number | null;
  /** Two one-sided tests against statedValue ± tolerance; null without a tolerance or without a usable t test. */
  readonly equivalence: EquivalenceTestResult | null;
  /** Decimals every number of the claim's wording and verdict is shown with (claimDigits). */
  readonly digits: number;
  readonly groups: readonly ClaimGroupSummary[];
  /** Mean (one-sample) or mean A − mean B (two-group), in `unit`. */
  readonly estimate: number | null;
  /** 95 % interval of the estimate matching the alternative (one-sided: one open end, null). */
  readonly ci95: Interval;
  readonly t: number | null;
  readonly df: number | null;
  readonly p: number | null;
  /** Mann–Whitney U check for two groups (null for one-sample claims). */
  readonly rankCheck: { readonly name: "Mann–Whitney U"; readonly u: number; readonly p: number | null; readonly method: "exact" | "normal" } | null;
  /** Hedges' g: (mean A − mean B)/pooled SD, or (mean − stated value)/SD for one sample, bias-corrected. */
  readonly hedgesG: number | null;
  readonly hedgesGCi95: Interval | null;
  /** Smallest true difference this test would detect with 80 % power at `alpha` (normal approximation). */
  readonly minimumDetectableDifference: number | null;
  readonly power: number;
  readonly outcome: ClaimOutcome;
  readonly verdict: string;
  readonly caveats: readonly ClaimCaveat[];
  readonly warnings: readonly string[];
}

/**
 * Adjusted Fisher–Pearson sample skewness G1 = n/((n−1)(n−2)) · Σ((x − mean)/s)³ with s the
 * sample SD (Joanes & Gill 1998, "b1"/"G1"; the bias-corrected form SciPy gives with bias=False).
 * Null below 3 finite values or with zero spread.
 */
export function sampleSkewness(values: readonly number[]): number | null {
  const { finite } = finiteValues(values);
  const n = finite.length;
  if (n < 3) return null;
  const mean = finite.reduce((s, v) => s + v, 0) / n;
  let m2 = 0;
  let m3 = 0;
  for (const v of finite) {
    const d = v - mean;
    m2 += d * d;
    m3 += d * d * d;
  }
  const sd = Math.sqrt(m2 / (n - 1));
  if (!(sd > 0) || !Number.isFinite(sd)) return null;
  const g = (n / ((n - 1) * (n - 2))) * (m3 / sd ** 3);
  return Number.isFinite(g) ? g + 0 : null;
}

function largestSite(siteIds: readonly string[] | undefined, n: number): ClaimGroupSummary["largestSite"] {
  if (!siteIds || siteIds.length === 0 || n === 0) return null;
  const counts = new Map<string, number>();
  for (const id of siteIds) counts.set(id, (counts.get(id) ?? 0) + 1);
  let best: { siteId: string; share: number } | null = null;
  for (const [siteId, count] of [...counts.entries()].sort((a, b) => a[0].localeCompare(b[0]))) {
    const share = count / siteIds.length;
    if (!best || share > best.share) best = { siteId, share };
  }
  return best;
}

function summarise(group: ClaimGroupInput): ClaimGroupSummary {
  if (group.siteIds && group.siteIds.length !== group.values.length) {
    throw new StatsInputError(`group "${group.label}": ${group.siteIds.length} site ids for ${group.values.length} values`);
  }
  const d = describe(group.values);
  return {
    label: group.label,
    n: d.n,
    mean: d.mean,
    sd: d.sd,
    median: d.median,
    skewness: sampleSkewness(group.values),
    largestSite: largestSite(group.siteIds, d.n),
  };
}

/** "p = 0.034", "p < 0.001". */
export function formatP(p: number | null): string {
  if (p === null) return "p undefined";
  if (p < 0.001) return "p < 0.001";
  return `p = ${p < 0.01 ? p.toFixed(4) : p.toFixed(3)}`;
}

/** Fewest and most decimals a claim's numbers are shown with. */
const CLAIM_MIN_DIGITS = 2;
const CLAIM_MAX_DIGITS = 6;

/**
 * Decimals for a claim's wording and verdict alike: at least 2, and enough to show each stated
 * number (value, tolerance) exactly as given, up to 6. "6.5" → 2, "6.125" → 3.
 */
export function claimDigits(stated: readonly (number | null | undefined)[]): number {
  let digits = CLAIM_MIN_DIGITS;
  for (const value of stated) {
    if (value === null || value === undefined || !Number.isFinite(value)) continue;
    let d = 0;
    while (d < CLAIM_MAX_DIGITS && Number(value.toFixed(d)) !== value) d += 1;
    digits = Math.max(digits, d);
  }
  return digits;
}

/** The one number format of claim wording and verdict: fixed `digits` decimals, no "-0.00". */
export function formatClaimNumber(value: number | null, digits: number): string {
  if (value === null) return "—";
  const text = value.toFixed(digits);
  return /^-0(\.0+)?$/.test(text) ? text.slice(1) : text;
}

function intervalText(ci: Interval, unit: string, digits: number): string {
  const num = (v: number | null) => formatClaimNumber(v, digits);
  const level = `${Math.round(ci.level * 100)} %`;
  if (ci.low === null && ci.high === null) return "no interval";
  if (ci.low === null) return `${level} upper bound ${num(ci.high)} ${unit}`;
  if (ci.high === null) return `${level} lower bound ${num(ci.low)} ${unit}`;
  return `${level} CI ${num(ci.low)} to ${num(ci.high)} ${unit}`;
}

/** Bias-corrected standardised difference of one mean from a stated value: J·(mean − value)/SD, J = 1 − 3/(4·df − 1), df = n − 1 (Hedges & Olkin 1985). */
function oneSampleHedgesG(n: number, mean: number | null, sd: number | null, statedValue: number): number | null {
  if (mean === null || sd === null || !(sd > 0) || n < 3) return null;
  const df = n - 1;
  const g = (1 - 3 / (4 * df - 1)) * ((mean - statedValue) / sd);
  return Number.isFinite(g) ? g + 0 : null;
}

function safeMdd(sd: number | null, nA: number, nB: number | undefined, alpha: number, alternative: Alternative): number | null {
  if (sd === null || !(sd > 0) || nA < 2 || (nB !== undefined && nB < 2)) return null;
  try {
    return minimumDetectableDifference({ sd, nA, ...(nB === undefined ? {} : { nB }), alpha, power: 0.8, alternative }).difference;
  } catch (error) {
    if (error instanceof StatsInputError) return null;
    throw error;
  }
}

function groupCaveats(groups: readonly ClaimGroupSummary[], kind: ClaimCheckInput["kind"], digits: number): ClaimCaveat[] {
  const num = (v: number | null) => formatClaimNumber(v, digits);
  const caveats: ClaimCaveat[] = [];
  const name = (g: ClaimGroupSummary) => (kind === "one-sample" ? "the sample" : `group ${g.label}`);
  for (const g of groups) {
    if (g.n < SMALL_GROUP_N) {
      caveats.push({ code: "small-n", message: `Small sample: ${name(g)} has ${g.n} flight${g.n === 1 ? "" : "s"} (fewer than ${SMALL_GROUP_N}); the t test leans on normality and the result can change with a few more flights.` });
    }
    if (g.skewness !== null && Math.abs(g.skewness) > SKEWNESS_LIMIT) {
      caveats.push({ code: "skewed", message: `Skewed data: ${name(g)} has sample skewness ${num(g.skewness)} (beyond ±${SKEWNESS_LIMIT}); the median (${num(g.median)}) describes it better than the mean, and the t test is less reliable at this n.` });
    }
    if (g.largestSite && g.largestSite.share > ONE_SITE_SHARE_LIMIT) {
      caveats.push({ code: "one-site", message: `Clustered at one site: ${Math.round(g.largestSite.share * 100)} % of ${name(g)} comes from one site (${g.largestSite.siteId}); the result may describe that site rather than the program.` });
    }
  }
  return caveats;
}

/**
 * Runs the test that fits the claim and words the verdict.
 * One sample: Student's one-sample t test against the stated value (lib/stats oneSampleTTest).
 * Two groups: Welch's t test (lib/stats welchTTest) with a Mann–Whitney U check on the same
 * alternative; Hedges' g; the minimum detectable difference at this n with 80 % power
 * (lib/stats minimumDetectableDifference, pooled SD for two groups). Two-sided one-sample claims
 * ("mean = v") are judged "consistent" or "contradicted"; directional and two-group claims are
 * "supported" or "not shown". Caveats: n < 10 in a group, |skewness| > 1, more than 70 % of a
 * group from one site, Welch and Mann–Whitney disagreeing at `alpha`, and an estimate pointing the
 * other way from a directional claim.
 */
export function runClaimCheck(input: ClaimCheckInput): ClaimCheckResult {
  const alpha = input.alpha ?? 0.05;
  assertLevel(alpha, "alpha");
  assertAlternative(input.alternative);
  const { alternative, metricLabel, unit } = input;
  const warnings: string[] = [];

  if (input.kind === "one-sample") {
    if (!Number.isFinite(input.statedValue)) throw new StatsInputError(`statedValue must be finite, got ${input.statedValue}`);
    const tolerance = input.tolerance ?? null;
    if (tolerance !== null && !(tolerance > 0 && Number.isFinite(tolerance))) throw new StatsInputError(`tolerance must be a finite number > 0, got ${tolerance}`);
    if (tolerance !== null && alternative !== "two-sided") throw new StatsInputError("a tolerance belongs to a two-sided \"equals\" claim");
    const digits = claimDigits([input.statedValue, tolerance]);
    const num = (value: number | null) => formatClaimNumber(value, digits);
    const group = summarise(input.group);
    const test = oneSampleTTest(input.group.values, input.statedValue, alternative);
    warnings.push(...test.warnings);
    const caveats = groupCaveats([group], "one-sample", digits);
    const mdd = safeMdd(group.sd, group.n, undefined, alpha, alternative);
    const v = input.statedValue;
    const est = test.estimate;
    const ci = intervalText(test.ci95, unit, digits);
    const equivalence =
      tolerance !== null && est !== null && test.standardError !== null && test.df !== null
        ? equivalenceTest(est, input.statedValue, tolerance, test.standardError, test.df, alpha)
        : null;
    let outcome: ClaimOutcome;
    let verdict: string;
    const mddText = mdd === null ? "" : ` With ${group.n} flights, only differences of about ${num(mdd)} ${unit} or more would be detected reliably (80 % power).`;
    if (test.p === null || est === null) {
      outcome = "undetermined";
      verdict = `The claim cannot be tested: ${group.n < 2 ? `only ${group.n} flight${group.n === 1 ? "" : "s"} ha${group.n === 1 ? "s" : "ve"} a value` : "the values have no spread"}.`;
      caveats.push({ code: "few-values", message: "A t test needs at least 2 flights with different values." });
    } else if (tolerance !== null && equivalence) {
      const range = `${num(v - tolerance)} to ${num(v + tolerance)} ${unit}`;
      const tost = `two one-sided tests ${formatP(equivalence.p)}, ${intervalText(equivalence.interval, unit, digits)}`;
      const claimText = `${num(v)} ± ${num(tolerance)} ${unit}`;
      if (equivalence.equivalent) {
        outcome = "equivalent";
        const clearButSmall =
          test.p < alpha ? ` The mean does differ from ${num(v)} ${unit} (${formatP(test.p)}), but by less than the stated tolerance.` : "";
        verdict = `The data support the claim of ${claimText}: the mean ${metricLabel} is ${num(est)} ${unit} and lies within ${range} (${tost}, n = ${group.n}).${clearButSmall}`;
      } else if (test.p < alpha) {
        outcome = "contradicted";
        const size = equivalence.beyondTolerance
          ? `the difference is also larger than the stated tolerance of ${num(tolerance)} ${unit} (the ${intervalText(equivalence.interval, unit, digits)} lies outside ${range})`
          : `the data cannot tell whether the difference is larger than the stated tolerance of ${num(tolerance)} ${unit} (the ${intervalText(equivalence.interval, unit, digits)} overlaps ${range})`;
        verdict = `The data contradict the claim of ${claimText}: the mean ${metricLabel} is ${num(est)} ${unit} (${ci}), which differs from ${num(v)} ${unit} (${formatP(test.p)}, n = ${group.n}); ${size}.`;
      } else {
        outcome = "inconclusive";
        verdict = `The data neither show a difference nor show the claim of ${claimText}: the mean ${metricLabel} is ${num(est)} ${unit}; there is no evidence against ${num(v)} ${unit} (${formatP(test.p)}), but the ${intervalText(equivalence.interval, unit, digits)} reaches beyond ${range} (${tost}, n = ${group.n}). No evidence against a value is not evidence for it.${mddText}`;
      }
    } else if (alternative === "two-sided") {
      if (test.p < alpha) {
        outcome = "contradicted";
        verdict = `The data contradict the claim: the mean ${metricLabel} is ${num(est)} ${unit} (${ci}), which differs from ${num(v)} ${unit} (${formatP(test.p)}, n = ${group.n}).`;
      } else {
        outcome = "consistent";
        verdict = `The data are consistent with the claim: the mean ${metricLabel} is ${num(est)} ${unit} (${ci}); a true mean of ${num(v)} ${unit} cannot be ruled out (${formatP(test.p)}, n = ${group.n}). This does not prove the mean is ${num(v)} ${unit}.${mddText}`;
      }
    } else {
      const word = alternative === "greater" ? "above" : "below";
      if (test.p < alpha) {
        outcome = "supported";
        verdict = `The data support the claim: the mean ${metricLabel} is ${num(est)} ${unit} (${ci}), ${word} ${num(v)} ${unit} (one-sided ${formatP(test.p)}, n = ${group.n}).`;
      } else {
        outcome = "not-shown";
        verdict = `The data do not show that the mean ${metricLabel} is ${word} ${num(v)} ${unit}: the mean is ${num(est)} ${unit} (${ci}; one-sided ${formatP(test.p)}, n = ${group.n}).${mddText}`;
        if ((alternative === "greater" && est < v) || (alternative === "less" && est > v)) {
          caveats.push({ code: "opposite-direction", message: `The sample mean lies on the other side of ${num(v)} ${unit} from the claim.` });
        }
      }
    }
    return {
      kind: "one-sample",
      test: "one-sample t",
      alternative,
      alpha,
      metricLabel,
      unit,
      statedValue: v,
      tolerance,
      equivalence,
      digits,
      groups: [group],
      estimate: est,
      ci95: test.ci95,
      t: test.t,
      df: test.df,
      p: test.p,
      rankCheck: null,
      hedgesG: oneSampleHedgesG(group.n, group.mean, group.sd, v),
      hedgesGCi95: null,
      minimumDetectableDifference: mdd,
      power: 0.8,
      outcome,
      verdict,
      caveats,
      warnings,
    };
  }

  const digits = claimDigits([]);
  const num = (value: number | null) => formatClaimNumber(value, digits);
  const a = summarise(input.groupA);
  const b = summarise(input.groupB);
  const welch = welchTTest(input.groupA.values, input.groupB.values, alternative);
  warnings.push(...welch.warnings);
  const caveats = groupCaveats([a, b], "two-group", digits);
  const canRank = a.n >= 1 && b.n >= 1;
  const rank = canRank ? mannWhitneyU(input.groupA.values, input.groupB.values, alternative) : null;
  if (rank) warnings.push(...rank.warnings.map((w) => `Mann–Whitney: ${w}`));
  const g = hedgesG(input.groupA.values, input.groupB.values);
  const pooledSd =
    a.sd !== null && b.sd !== null && a.n + b.n > 2 ? Math.sqrt(((a.n - 1) * a.sd ** 2 + (b.n - 1) * b.sd ** 2) / (a.n + b.n - 2)) : null;
  const mdd = safeMdd(pooledSd, a.n, b.n, alpha, alternative);
  const est = welch.meanDifference;
  const ci = intervalText(welch.ci95, unit, digits);
  const labelA = input.groupA.label;
  const labelB = input.groupB.label;
  const means = `${labelA} mean ${num(a.mean)} ${unit} (n = ${a.n}), ${labelB} mean ${num(b.mean)} ${unit} (n = ${b.n})`;
  const mddText = mdd === null ? "" : ` With these group sizes, only differences of about ${num(mdd)} ${unit} or more would be detected reliably (80 % power).`;
  let outcome: ClaimOutcome;
  let verdict: string;
  if (welch.p === null || est === null) {
    outcome = "undetermined";
    verdict = `The claim cannot be tested: ${a.n < 2 || b.n < 2 ? `each group needs at least 2 flights (${labelA}: ${a.n}, ${labelB}: ${b.n})` : "the values have no spread"}.`;
    caveats.push({ code: "few-values", message: "Welch's t test needs at least 2 flights with values in each group." });
  } else {
    const claimWords =
      alternative === "greater" ? `${labelA} is higher than ${labelB}` : alternative === "less" ? `${labelA} is lower than ${labelB}` : `${labelA} and ${labelB} differ`;
    const sided = alternative === "two-sided" ? "" : "one-sided ";
    if (welch.p < alpha) {
      outcome = "supported";
      verdict = `The data support the claim that the mean ${metricLabel} of ${claimWords}: difference ${num(est)} ${unit} (${ci}; Welch ${sided}${formatP(welch.p)}); ${means}.`;
    } else {
      outcome = "not-shown";
      verdict = `The data do not show that the mean ${metricLabel} of ${claimWords}: difference ${num(est)} ${unit} (${ci}; Welch ${sided}${formatP(welch.p)}); ${means}.${mddText}`;
      if ((alternative === "greater" && est < 0) || (alternative === "less" && est > 0)) {
        caveats.push({ code: "opposite-direction", message: `The difference points the other way from the claim (${labelA} − ${labelB} = ${num(est)} ${unit}).` });
      }
    }
    if (rank && rank.p !== null && rank.p < alpha !== welch.p < alpha) {
      caveats.push({
        code: "tests-disagree",
        message: `Welch's t test (${formatP(welch.p)}) and the Mann–Whitney check (${formatP(rank.p)}) disagree at α = ${alpha}; outliers or skew may drive the result, so treat it as uncertain.`,
      });
    }
  }
  return {
    kind: "two-group",
    test: "Welch t",
    alternative,
    alpha,
    metricLabel,
    unit,
    statedValue: null,
    tolerance: null,
    equivalence: null,
    digits,
    groups: [a, b],
    estimate: est,
    ci95: welch.ci95,
    t: welch.t,
    df: welch.df,
    p: welch.p,
    rankCheck: rank ? { name: "Mann–Whitney U", u: rank.u, p: rank.p, method: rank.method } : null,
    hedgesG: g.g,
    hedgesGCi95: g.g === null ? null : g.ci95,
    minimumDetectableDifference: mdd,
    power: 0.8,
    outcome,
    verdict,
    caveats,
    warnings,
  };
}
