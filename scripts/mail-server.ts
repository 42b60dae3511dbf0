/**
 * The local stand-in for a hosted mail service: an SMTP server on loopback that accepts every
 * message and stores it as an .eml file, so that mail the app sends can be read during
 * development and checked in tests.
 *
 *   node --import tsx scripts/mail-server.ts [--port 2525] [--host 127.0.0.1] [--dir .data/mail]
 *
 * Without flags it reads SMTP_PORT and MAIL_DIR. No authentication, no STARTTLS: it never leaves loopback.
 */
import { randomBytes } from "node:crypto";
import { mkdir, rename, writeFile } from "node:fs/promises";
import { resolve, join } from "node:path";
import { pathToFileURL } from "node:url";
import { SMTPServer } from "smtp-server";

/** Messages above this size are refused; the app sends small notices, not attachments. */
export const MAX_MESSAGE_BYTES = 10 * 1024 * 1024;

export interface MailServerOptions {
  /** Folder the .eml files go to; created if missing. */
  dir: string;
  /** 0 picks a free port. */
  port?: number;
  host?: string;
  /** Called with the path of each stored message. */
  onStored?: (file: string) => void;
}

export interface RunningMailServer {
  host: string;
  port: number;
  dir: string;
  close(): Promise<void>;
}

/** Starts the SMTP server; resolves once it listens. */
export async function startMailServer(options: MailServerOptions): Promise<RunningMailServer> {
  const host = options.host ?? "127.0.0.1";
  const dir = resolve(options.dir);
  await mkdir(dir, { recursive: true });

  const server = new SMTPServer({
    authOptional: true,
    // Any credentials are accepted, so an SMTP_URL with a user and password works locally too.
    allowInsecureAuth: true,
    onAuth(auth, _session, callback) {
      callback(null, { user: auth.username ?? "local" });
    },
    disabledCommands: ["STARTTLS"],
    size: MAX_MESSAGE_BYTES,
    banner: "Cyclegate local mail",
    logger: false,
    onData(stream, session, callback) {
      const chunks: Buffer[] = [];
      stream.on("data", (chunk: Buffer) => chunks.push(chunk));
      stream.on("end", () => {
        if (stream.sizeExceeded) {
          callback(Object.assign(new Error("Message exceeds the size limit"), { responseCode: 552 }));
          return;
        }
        const envelope = session.envelope;
        const from = envelope.mailFrom ? envelope.mailFrom.address : "";
        const to = envelope.rcptTo.map((r) => r.address).join(", ");
        // Envelope headers first, so a reader sees who it was really sent to (Bcc included).
        const head = `X-Envelope-From: <${from}>\r\nX-Envelope-To: ${to}\r\n`;
        const stamp = new Date().toISOString().replace(/[:.]/g, "-");
        const name = `${stamp}-${randomBytes(4).toString("hex")}.eml`;
        const file = join(dir, name);
        // Written under a temporary name and renamed, so a reader never sees half a message.
        writeFile(`${file}.part`, Buffer.concat([Buffer.from(head), ...chunks]))
          .then(() => rename(`${file}.part`, file))
          .then(() => {
            options.onStored?.(file);
            callback(null, `Stored as ${name}`);
          })
          .catch((error: unknown) => {
            callback(Object.assign(new Error(`Could not store the message: ${String(error)}`), { responseCode: 451 }));
          });
      });
      stream.on("error", (error: Error) => callback(error));
    },
  });

  await new Promise<void>((resolveListen, rejectListen) => {
    const onError = (error: Error) => rejectListen(error);
    server.once("error", onError);
    server.listen(options.port ?? 0, host, () => {
      server.off("error", onError);
      resolveListen();
    });
  });
  server.on("error", (error) => console.error(`[mail] ${error.message}`));

  const address = server.server.address();
  const port = typeof address === "object" && address ? address.port : (options.port ?? 0);
  return {
    host,
    port,
    dir,
    close: () => new Promise<void>((done) => server.close(() => done())),
  };
}

function parseArgs(argv: string[]): { port: number; host: string; dir: string } {
  const values = new Map<string, string>();
  for (let i = 0; i < argv.length; i += 2) {
    const key = argv[i];
    const value = argv[i + 1];
    if (!key?.startsWith("--") || value === undefined || !["--port", "--host", "--dir"].includes(key)) {
      throw new Error(`unexpected argument ${key ?? ""}; use --port N --host ADDR --dir FOLDER`);
    }
    values.set(key, value);
  }
  const portText = values.get("--port") ?? (process.env.SMTP_PORT || "2525");
  const port = Number(portText);
  if (!Number.isInteger(port) || port < 0 || port > 65535) throw new Error(`invalid port ${portText}`);
  const dir = values.get("--dir") ?? (process.env.MAIL_DIR || ".data/mail");
  return { port, host: values.get("--host") ?? "127.0.0.1", dir };
}

async function main(): Promise<void> {
  let args: ReturnType<typeof parseArgs>;
  try {
    args = parseArgs(process.argv.slice(2));
  } catch (error) {
    console.error(`[mail] ${error instanceof Error ? error.message : String(error)}`);
    process.exit(2);
  }
  let running: RunningMailServer;
  try {
    running = await startMailServer({
      ...args,
      onStored: (file) => console.error(`[mail] stored ${file}`),
    });
  } catch (error) {
    console.error(`[mail] could not listen on ${args.host}:${args.port}: ${error instanceof Error ? error.message : String(error)}`);
    process.exit(1);
  }
  console.error(`[mail] listening on smtp://${running.host}:${running.port}, storing messages in ${running.dir}`);
  const stop = () => {
    void running.close().then(() => process.exit(0));
    // smtp-server waits for open connections; do not let one keep us alive.
    setTimeout(() => process.exit(0), 2000).unref();
  };
  process.once("SIGTERM", stop);
  process.once("SIGINT", stop);
}

if (process.argv[1] && import.meta.url === pathToFileURL(resolve(process.argv[1])).href) {
  void main();
}
