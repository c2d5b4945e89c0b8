export declare const PANE_GZIP_LIMIT: number;
export declare function pageSize(
  dir: string,
  page: string,
): { page: string; scripts: string[]; external: string[]; minified: number; gzipped: number };
