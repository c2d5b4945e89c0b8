export declare const DEFAULT_DIR: string;
export declare function findCertificate(): { cert: Buffer; key: Buffer } | null;
export declare function startServer(options?: {
  dir?: string;
  port?: number;
  host?: string;
  tls?: { cert: Buffer; key: Buffer } | null;
}): Promise<{ url: string; port: number; close: () => Promise<void> }>;
