/**
 * Preload for the no-network test (NODE_OPTIONS=--require this file): every way a Node.js
 * program reaches the network throws, so a run that tried would fail loudly. Replaced: TCP and
 * IPC sockets (net.Socket.prototype.connect, net.connect/createConnection), TLS (tls.connect),
 * UDP (dgram.createSocket), DNS (dns.lookup, dns.resolve*, dns.promises), HTTP and HTTPS
 * (request/get, http2.connect) and the global fetch / WebSocket. syncBuiltinESMExports() then
 * makes the ES module bindings of those built-ins (`import { request } from 'node:http'`) the
 * replaced functions too; without it, named imports in ES modules keep the originals.
 *
 * With NO_NETWORK_LOG set to a file, each process that loads the preload appends a line
 * `loaded <pid> <arguments>`, and each attempt a line `attempt <what>` before it throws, so a
 * test can see that the preload was in force and that no attempt was caught and swallowed.
 */
'use strict';
const { appendFileSync } = require('node:fs');
const log = (line) => {
  if (process.env.NO_NETWORK_LOG) appendFileSync(process.env.NO_NETWORK_LOG, `${line}\n`);
};
log(`loaded ${process.pid} ${process.argv.slice(2).join(' ')}`);
const fail = (what) => () => {
  log(`attempt ${what}`);
  throw new Error(`termdrift test: network access attempted (${what})`);
};
const net = require('node:net');
net.Socket.prototype.connect = fail('net.Socket.connect');
net.connect = net.createConnection = fail('net.connect');
require('node:tls').connect = fail('tls.connect');
require('node:dgram').createSocket = fail('dgram.createSocket');
const dns = require('node:dns');
for (const k of Object.keys(dns)) if (/^(lookup|resolve)/.test(k) && typeof dns[k] === 'function') dns[k] = fail(`dns.${k}`);
for (const k of Object.keys(dns.promises)) if (/^(lookup|resolve)/.test(k)) dns.promises[k] = fail(`dns.promises.${k}`);
for (const m of ['node:http', 'node:https']) {
  const mod = require(m);
  mod.request = fail(`${m}.request`);
  mod.get = fail(`${m}.get`);
}
require('node:http2').connect = fail('http2.connect');
globalThis.fetch = fail('fetch');
if (globalThis.WebSocket) globalThis.WebSocket = fail('WebSocket');
require('node:module').syncBuiltinESMExports();
