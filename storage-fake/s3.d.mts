export const CORS_XML: string;
export function startStorageFake(options: {
  port?: number;
  host?: string;
  directory: string;
  buckets?: string[];
  quiet?: boolean;
}): Promise<{ port: number; url: string; close(): Promise<void> }>;
