// citation-js ships no type declarations; these cover the part Isthmus uses.
declare module '@citation-js/core' {
  export class Cite {
    constructor(data: unknown, options?: Record<string, unknown>)
    data: Record<string, unknown>[]
    format(format: string, options?: Record<string, unknown>): string | unknown
  }
}
declare module '@citation-js/plugin-bibtex'
declare module '@citation-js/plugin-csl'
