/**
 * The MLLP listener: HL7 v2 over TCP (start block 0x0B, end block 0x1C 0x0D), framing and parsing
 * by @medplum/hl7's Hl7Connection. We open the socket ourselves so it binds to one address
 * (loopback unless EBB_MLLP_HOST says otherwise; Hl7Server listens on every interface).
 * Stateless: any number of listeners may run against one database.
 */
import net from 'node:net';
import { Hl7Connection, type Hl7ErrorEvent, type Hl7MessageEvent } from '@medplum/hl7';
import { Hl7Message } from '@medplum/core';
import { bareRejectAck } from '~/lib/hl7/oru.ts';
import { receiveHl7 } from './receive.ts';

export interface MllpListener {
  port: number;
  close: () => Promise<void>;
}

export async function startMllpListener(
  port: number,
  host = '127.0.0.1',
  log: (line: string) => void = () => {},
): Promise<MllpListener> {
  const sockets = new Set<net.Socket>();
  let seq = 0;
  const server = net.createServer((socket) => {
    sockets.add(socket);
    socket.on('close', () => sockets.delete(socket));
    const conn = new Hl7Connection(socket, 'utf-8');
    // Messages of one connection are answered in order: a gateway waits for each ACK anyway.
    let chain = Promise.resolve();
    conn.addEventListener('message', (e: Hl7MessageEvent) => {
      const msg = e.message;
      if (msg.getSegment('MSA')) return; // an ACK sent to us: nothing to answer
      chain = chain
        .then(async () => {
          const out = await receiveHl7(msg);
          if (out.code !== 'AA')
            log(`${out.code} ${msg.header.getField(10)?.toString() ?? ''}: ${out.problem?.reason ?? ''}`);
          if (!conn.isClosed()) conn.send(out.ack);
        })
        .catch((err) => log(`failed: ${(err as Error).message}`));
    });
    conn.addEventListener('error', (e: Hl7ErrorEvent) => {
      // A framed block that is not an HL7 message (no MSH): refuse it; there is no control ID to echo.
      if (/Invalid HL7 message/i.test(e.error.message) && !socket.destroyed) {
        const reason = 'Not an HL7 v2 message: the first segment must be MSH';
        log(`AR: ${reason}`);
        conn.send(Hl7Message.parse(bareRejectAck(reason, new Date(), `EBB${Date.now()}${++seq}`)));
      }
    });
  });
  await new Promise<void>((resolve, reject) => {
    server.once('error', reject);
    server.listen(port, host, () => {
      server.off('error', reject);
      resolve();
    });
  });
  const bound = (server.address() as net.AddressInfo).port;
  return {
    port: bound,
    close: () =>
      new Promise<void>((resolve) => {
        for (const s of sockets) s.destroy();
        server.close(() => resolve());
      }),
  };
}
