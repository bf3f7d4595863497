import express, { type Express } from "express";
import swaggerUi from "swagger-ui-express";

/** The files the docs page loads: swagger-ui's script, style and icons, and the start-up script swagger-ui-express writes. */
const pageFiles =
  /^\/(?:swagger-ui\.css|swagger-ui-bundle\.js|swagger-ui-standalone-preset\.js|swagger-ui-init\.js|favicon-(?:16x16|32x32)\.png)$/;

/**
 * Interactive API docs at /api/docs/. Mounted alone, swagger-ui-express answers every path below it with its page (and
 * serves the whole swagger-ui-dist folder), so only the page and the files it loads are served here; any other path
 * falls through to the API's problem+json 404.
 */
export function mountApiDocs(app: Express, openApiUrl: string) {
  const files = express.Router();
  files.use(swaggerUi.serveFiles(undefined, { swaggerUrl: openApiUrl }));
  const page = swaggerUi.setup(undefined, { customSiteTitle: "Plotbank API", swaggerOptions: { url: openApiUrl } });
  app.get("/api/docs", (req, res, next) => {
    // The page names its files relatively (./swagger-ui.css), which resolves below /api/docs/ only.
    if (!req.path.endsWith("/")) return res.redirect(301, "/api/docs/");
    page(req, res, next);
  });
  app.use("/api/docs", (req, res, next) => (pageFiles.test(req.path) ? files(req, res, next) : next()));
}
