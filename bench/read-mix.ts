/** The public read paths the load benchmarks send in turn: catalogue, responses, meta-analyses, observations, health. */
export const readMix = [
  "/api/v1/datasets",
  "/api/v1/responses?nutrient=P&placement=2x2-band&soilTestClass=low",
  "/api/v1/analyses/meta?crop=soybean&nutrient=P&placement=2x2-band&groupBy=soilTestClass&price=11&cost=18",
  "/api/v1/analyses/meta?crop=corn&nutrient=K",
  "/api/v1/observations?crop=soybean&limit=200",
  "/api/v1/site-years?crop=soybean",
  "/api/v1/health",
];
