/** The part of subset-font 2.9 that scripts/build-web-fonts.ts uses (the package ships no types). */
declare module "subset-font" {
  export default function subsetFont(
    font: Buffer,
    text: string,
    options?: { targetFormat?: "sfnt" | "woff" | "woff2" | "truetype"; keepFeatures?: string[] },
  ): Promise<Buffer>;
}
