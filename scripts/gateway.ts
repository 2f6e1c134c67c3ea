// `npm run gateway`: the press gateway as its own process, to run near the presses. It reads the
// presses' shot counters from the plant's MQTT broker and posts them to Castellan's shot API.
//   GATEWAY_MQTT_URL      mqtt://broker:1883            the plant's broker
//   GATEWAY_TOPIC_PREFIX  castellan/presses             topics: {prefix}/{press}/counter and /die
//   CASTELLAN_URL         http://localhost:3000         Castellan's address
//   CASTELLAN_TOKEN       (required)                    an API token with the shots:write scope
//   GATEWAY_FLUSH_SECONDS 60                            at most one entry per press per flush
//   GATEWAY_STATE_FILE    ./data/press-gateway.json     last counters and undelivered entries
//   GATEWAY_CLIENT_ID     castellan-gateway             MQTT client id (the broker keeps its session)
import { castellanClient } from '../gateway/castellan-client';
import { startGateway } from '../gateway/gateway';

const env = process.env;
const token = env.CASTELLAN_TOKEN;
if (!token) {
	console.error(
		'Error: set CASTELLAN_TOKEN to an API token with the shots:write scope (npm run token:add).'
	);
	process.exit(2);
}
const flushSeconds = Number(env.GATEWAY_FLUSH_SECONDS ?? 60);
if (!(flushSeconds > 0)) {
	console.error('Error: GATEWAY_FLUSH_SECONDS must be a number of seconds above 0.');
	process.exit(2);
}
const castellanUrl = env.CASTELLAN_URL ?? 'http://localhost:3000';
const gateway = await startGateway({
	mqttUrl: env.GATEWAY_MQTT_URL ?? 'mqtt://127.0.0.1:1883',
	topicPrefix: env.GATEWAY_TOPIC_PREFIX ?? 'castellan/presses',
	stateFile: env.GATEWAY_STATE_FILE ?? './data/press-gateway.json',
	clientId: env.GATEWAY_CLIENT_ID ?? 'castellan-gateway',
	flushMs: flushSeconds * 1000,
	retryMinMs: Number(env.GATEWAY_RETRY_MIN_MS ?? 1000),
	retryMaxMs: Number(env.GATEWAY_RETRY_MAX_MS ?? 60_000),
	castellan: castellanClient(castellanUrl, token),
	log: (line) => console.log(`[gateway] ${line}`)
});
console.log(`[gateway] posting to ${castellanUrl}, flushing every ${flushSeconds} s.`);

const stop = async () => {
	await gateway.stop();
	process.exit(0);
};
process.on('SIGINT', stop);
process.on('SIGTERM', stop);
