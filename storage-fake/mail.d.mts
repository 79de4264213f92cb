export interface MailFake {
  server: import("node:http").Server;
  port: number;
  url: string;
  outboxDir: string;
  close(): Promise<void>;
}
export function startMailFake(options: { port?: number; host?: string; outboxDir: string; quiet?: boolean }): Promise<MailFake>;
export function validateEmail(body: unknown): string | null;
