/** Public API of the Plotbank statistics engine (pure functions; see stats/README.md). */
export * from "@/stats/distributions";
export {
  fitLinearModel,
  factorLevels,
  type AnovaTableRow,
  type FactorColumn,
  type LinearModelFit,
  type LinearModelInput,
} from "@/stats/linear-model";
export * from "@/stats/mean-separation";
export * from "@/stats/rcbd-anova";
export * from "@/stats/pairwise-lsd";
export * from "@/stats/design-balance";
export * from "@/stats/one-way-anova";
export * from "@/stats/studentized-residuals";
export * from "@/stats/effects";
export * from "@/stats/decision";
export * from "@/stats/units";
export * from "@/stats/precision";
export * from "@/stats/meta/types";
export { estimateTauSquared } from "@/stats/meta/tau-squared";
export * from "@/stats/meta/meta-regression";
export * from "@/stats/meta/meta-analysis";
export * from "@/stats/meta/heterogeneity-interval";
export * from "@/stats/meta/subgroups";
export * from "@/stats/meta/continuous-moderator";
export * from "@/stats/meta/line-crossing";
