// An MQTT broker in the process (aedes, from npm) for the demo and the tests. A plant points the
// gateway at its own broker instead; `mosquitto` works the same (the test suite runs both).
import { createServer, type Server } from 'node:net';
import type { AddressInfo } from 'node:net';
import { Aedes } from 'aedes';

export interface LocalBroker {
	port: number;
	url: string;
	close(): Promise<void>;
}

export async function startBroker(port = 0, host = '127.0.0.1'): Promise<LocalBroker> {
	const broker = await Aedes.createBroker();
	const server: Server = createServer(broker.handle);
	const sockets = new Set<import('node:net').Socket>();
	server.on('connection', (s) => {
		sockets.add(s);
		s.on('close', () => sockets.delete(s));
	});
	await new Promise<void>((resolve, reject) => {
		server.once('error', reject);
		server.listen(port, host, () => resolve());
	});
	const actual = (server.address() as AddressInfo).port;
	return {
		port: actual,
		url: `mqtt://${host}:${actual}`,
		async close() {
			for (const s of sockets) s.destroy();
			await new Promise<void>((resolve) => server.close(() => resolve()));
			await new Promise<void>((resolve) => broker.close(() => resolve()));
		}
	};
}
