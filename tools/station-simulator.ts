// A local stand-in for the depot's chargers: each simulated station connects to Nightyard's OCPP
// central system, accepts charging profiles and reports meter values that follow them, so the
// demo shows live chargers. `npm start` runs it for the demo depot.
//   NIGHTYARD_OCPP_URL (default ws://127.0.0.1:3000/ocpp)
//   SIMULATOR_METER_SECONDS: how often each charger reports its meter values (default 15; the
//   browser tests use less, so waiting for a charger's next report takes seconds, not a quarter minute)
import { DEMO_CHARGER_PASSWORD, demoChargerIdentity, demoChargers } from '@nightyard/demo';
import { SimulatedStation } from '../apps/api/src/ocpp/simulated-station';

const meterSeconds = Number(process.env.SIMULATOR_METER_SECONDS ?? 15);
if (!(meterSeconds >= 1)) throw new Error('SIMULATOR_METER_SECONDS: give a number of seconds, at least 1');

/** The demo depot's chargers (of a tagged test district, with a tag), as simulated stations. */
function demoStations(url: string, tag?: string): SimulatedStation[] {
  return demoChargers.map(
    (c, i) =>
      new SimulatedStation({
        url,
        identity: demoChargerIdentity(c.label, tag),
        password: DEMO_CHARGER_PASSWORD,
        // The shared-cabinet dispensers speak OCPP 2.0.1; the others 1.6.
        protocol: c.cabinet ? 'ocpp2.0.1' : 'ocpp1.6',
        meterIntervalMs: meterSeconds * 1000 + i * 250,
      }),
  );
}

async function startAll(stations: SimulatedStation[], url: string): Promise<void> {
  await Promise.all(
    stations.map((s) => s.start().catch((err: Error) => console.error(`station ${s.client.identity}: ${err.message}`))),
  );
  console.log(`station simulator: ${stations.length} chargers connected to ${url}`);
}

async function main() {
  const url = process.env.NIGHTYARD_OCPP_URL ?? 'ws://127.0.0.1:3000/ocpp';
  // The browser tests start it empty and ask for each test district's chargers in turn.
  let stations = process.env.SIMULATOR_STATIONS === 'none' ? [] : demoStations(url);
  await startAll(stations, url);
  // Lets a supervisor process (the browser tests' web server list) know the simulator is up.
  // POST /fault/<label or identity> makes that charger report a fault, to show the yard's re-plan
  // offer; the fault stays until POST /clear/<label or identity> (or DELETE /fault/<...>).
  // PUT /stations?tag=<tag> swaps the stations for a tagged test district's chargers.
  // POST /plug/<label or identity>?soc=<%> plugs a bus in: the charger reports its state of charge.
  if (process.env.SIMULATOR_HEALTH_PORT) {
    const { createServer } = await import('node:http');
    createServer((req, res) => {
      const address = new URL(req.url ?? '/', 'http://simulator');
      const [, action, label] = /^\/(fault|clear|reports|plug)\/([\w-]+)$/.exec(address.pathname) ?? [];
      const find = () => stations.find((s) => s.client.identity === label || s.client.identity?.endsWith(`-${label}`));
      if (label && req.method === 'GET' && action === 'reports') {
        const station = find();
        return void (station
          ? res.writeHead(200, { 'content-type': 'application/json' }).end(JSON.stringify({ reports: station.reports }))
          : res.writeHead(404).end('unknown charger'));
      }
      if (label && req.method === 'POST' && action === 'plug') {
        const station = find();
        const soc = Number(address.searchParams.get('soc'));
        if (!station) return void res.writeHead(404).end('unknown charger');
        if (!(soc >= 0 && soc <= 100)) return void res.writeHead(400).end('give the state of charge as ?soc=0 to 100');
        void station.plugIn(soc).then(
          () => res.writeHead(204).end(),
          () => res.writeHead(502).end(),
        );
        return;
      }
      const clearing = (req.method === 'POST' && action === 'clear') || (req.method === 'DELETE' && action === 'fault');
      if (label && ((req.method === 'POST' && action === 'fault') || clearing)) {
        const station = find();
        if (!station) return void res.writeHead(404).end('unknown charger');
        void (clearing ? station.clear() : station.fault()).then(
          () => res.writeHead(204).end(),
          () => res.writeHead(502).end(),
        );
        return;
      }
      if (req.method === 'PUT' && address.pathname === '/stations') {
        const tag = address.searchParams.get('tag') ?? undefined;
        const old = stations;
        stations = demoStations(url, tag);
        void Promise.all(old.map((s) => s.stop().catch(() => undefined)))
          .then(() => startAll(stations, url))
          .then(
            () => res.writeHead(204).end(),
            () => res.writeHead(502).end(),
          );
        return;
      }
      res.writeHead(200).end('ok');
    }).listen(Number(process.env.SIMULATOR_HEALTH_PORT), '127.0.0.1');
  }
  const stop = () => Promise.all(stations.map((s) => s.stop())).finally(() => process.exit(0));
  process.on('SIGTERM', stop);
  process.on('SIGINT', stop);
}

if (process.argv[1]?.includes('station-simulator')) void main();
