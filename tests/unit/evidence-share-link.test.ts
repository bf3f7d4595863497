import { describe, expect, it } from "vitest";
import {
  apiParamsFromEvidenceState,
  countActiveFilters,
  curlCommand,
  defaultEvidenceState,
  evidenceStateFromParams,
  metaApiPath,
  paramsFromEvidenceState,
  routerParams,
  shareUrl,
  toggleListValue,
  type EvidenceState,
} from "@/lib/share-link";
import { metaQuery } from "@/schemas/analysis";

const state: EvidenceState = {
  ...defaultEvidenceState,
  filters: { nutrient: ["P"], placement: ["2x2-band", "in-furrow"], soilTestClass: ["low"], yearFrom: 2020, rowSpacingMin: 30 },
  method: "DL",
  units: "kg/ha",
  price: 11.5,
  productCost: 18,
  applicationCost: 6,
};

describe("share links", () => {
  it("round-trip: decode(encode(state)) is the state, prices included when asked for", () => {
    expect(evidenceStateFromParams(paramsFromEvidenceState(state, { withPrices: true }))).toEqual(state);
    const { price: _p, productCost: _c, applicationCost: _a, ...withoutPrices } = state;
    expect(evidenceStateFromParams(paramsFromEvidenceState(state))).toEqual(withoutPrices);
  });

  it("are canonical: lists sorted, defaults left out, keys in order", () => {
    expect(paramsFromEvidenceState(state, { withPrices: true })).toEqual({
      applicationCost: "6",
      method: "DL",
      nutrient: "P",
      placement: "2x2-band,in-furrow",
      price: "11.5",
      productCost: "18",
      rowSpacingMin: "30",
      soilTestClass: "low",
      units: "kg/ha",
      yearFrom: "2020",
    });
    expect(paramsFromEvidenceState(defaultEvidenceState)).toEqual({});
  });

  it("drop what the API would refuse, keeping the rest", () => {
    const s = evidenceStateFromParams({
      nutrient: "P,Zn",
      soilTestClass: "low",
      method: "ML",
      yearFrom: "abc",
      version: "1.0.0",
      price: "-3",
      colour: "red",
    });
    expect(s.filters).toEqual({ soilTestClass: ["low"] });
    expect(s.method).toBe("REML");
    expect(s.price).toBeUndefined();
  });

  it("read repeated parameters as lists", () => {
    expect(evidenceStateFromParams({ crop: ["soybean", "corn"] }).filters.crop).toEqual(["soybean", "corn"]);
  });

  it("give an API query the server accepts, with the screen's grouping named", () => {
    const api = apiParamsFromEvidenceState(state);
    expect(api.groupBy).toBe("soilTestClass");
    expect(metaQuery.safeParse(api).success).toBe(true);
    expect(metaApiPath(defaultEvidenceState)).toBe("/api/v1/analyses/meta?groupBy=soilTestClass");
    expect(metaApiPath(state)).toContain("placement=2x2-band,in-furrow");
    expect(metaApiPath(state)).toContain("units=kg/ha");
  });

  it("keep prices out of the screen's API query and its own URL; a share link has them only when chosen", () => {
    for (const text of [metaApiPath(state), JSON.stringify(routerParams(state)), shareUrl("http://h", state)]) {
      expect(text).not.toMatch(/price|Cost|11\.5/);
    }
    expect(routerParams(state).price).toBeUndefined();
    const shared = new URL(shareUrl("http://h", state, { withPrices: true })).searchParams;
    expect([shared.get("price"), shared.get("productCost"), shared.get("applicationCost")]).toEqual(["11.5", "18", "6"]);
  });

  it("build the share URL and a shell-safe curl line", () => {
    expect(shareUrl("http://127.0.0.1:8080/", { ...defaultEvidenceState, filters: { dataset: "tb-starter" } })).toBe(
      "http://127.0.0.1:8080/?dataset=tb-starter",
    );
    expect(curlCommand("http://x/api?a=1&b=2")).toBe("curl -H 'Accept: application/json' 'http://x/api?a=1&b=2'");
    expect(curlCommand("http://x/it's")).toBe("curl -H 'Accept: application/json' 'http://x/it'\\''s'");
  });

  it("clear keys that are no longer set when the router params are written", () => {
    const p = routerParams({ ...defaultEvidenceState, filters: { crop: ["corn"] } });
    expect(p.crop).toBe("corn");
    expect("nutrient" in p && p.nutrient === undefined).toBe(true);
    expect("price" in p && p.price === undefined).toBe(true);
  });

  it("toggle list filters, an empty list removing the filter", () => {
    expect(toggleListValue(undefined, "P")).toEqual(["P"]);
    expect(toggleListValue(["P", "K"], "P")).toEqual(["K"]);
    expect(toggleListValue(["P"], "P")).toBeUndefined();
    expect(countActiveFilters(state.filters)).toBe(5);
  });
});
