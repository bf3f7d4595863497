import { writeFileSync } from "node:fs";
import { migrateDatabase, openDatabase } from "@/db/client";
import { createApp } from "@/server/app";
import { loadConfig } from "@/server/config";
import { generateOpenApiDocument } from "@/server/openapi/registry";

/** `npm run openapi`: write the OpenAPI 3.1 document to openapi.json (the same one /api/v1/openapi.json serves). */
async function main() {
  const database = await openDatabase();
  await migrateDatabase(database);
  const config = loadConfig({ ...process.env, PLOTBANK_DEMO: "off" });
  const { ctx } = createApp({ database, config, webDistDir: false });
  const out = process.argv[2] ?? "openapi.json";
  writeFileSync(out, JSON.stringify(generateOpenApiDocument(ctx.registry, config.version), null, 2) + "\n");
  console.log(`wrote ${out} (${Object.keys(generateOpenApiDocument(ctx.registry, config.version).paths ?? {}).length} paths)`);
  await database.close();
}
main();
