/** Open licences a version may carry, by SPDX identifier, with their canonical deed URLs. */
const known: Record<string, { name: string; url: string }> = {
  "CC-BY-4.0": { name: "Creative Commons Attribution 4.0 International", url: "https://creativecommons.org/licenses/by/4.0/" },
  "CC-BY-SA-4.0": {
    name: "Creative Commons Attribution Share Alike 4.0 International",
    url: "https://creativecommons.org/licenses/by-sa/4.0/",
  },
  "CC-BY-NC-4.0": {
    name: "Creative Commons Attribution Non Commercial 4.0 International",
    url: "https://creativecommons.org/licenses/by-nc/4.0/",
  },
  "CC0-1.0": { name: "Creative Commons Zero v1.0 Universal", url: "https://creativecommons.org/publicdomain/zero/1.0/" },
  "ODbL-1.0": { name: "Open Data Commons Open Database License v1.0", url: "https://opendatacommons.org/licenses/odbl/1-0/" },
  "ODC-By-1.0": { name: "Open Data Commons Attribution License v1.0", url: "https://opendatacommons.org/licenses/by/1-0/" },
  "PDDL-1.0": { name: "Open Data Commons Public Domain Dedication & License 1.0", url: "https://opendatacommons.org/licenses/pddl/1-0/" },
};

export interface LicenceInfo {
  spdx: string;
  name: string;
  /** Absent for a licence Plotbank does not know; the SPDX list page is then the best pointer. */
  url?: string;
}

export function licenceInfo(spdx: string): LicenceInfo {
  const hit = Object.entries(known).find(([id]) => id.toLowerCase() === spdx.toLowerCase());
  return hit ? { spdx: hit[0], ...hit[1] } : { spdx, name: spdx };
}
