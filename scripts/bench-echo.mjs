// The floor of `npm run bench:live`: a bare socket.io server that acknowledges every `echo` with
// its payload — what one round trip costs on this machine with no app, database or views.
// Listens on a free loopback port and prints it as "echo-port <port>".
import { createServer } from 'node:http';
import { Server } from 'socket.io';

const http = createServer();
const io = new Server(http, { serveClient: false });
io.on('connection', (socket) => {
  socket.on('echo', (payload, ack) => {
    if (typeof ack === 'function') ack(payload);
  });
});
http.listen(0, '127.0.0.1', () => console.log(`echo-port ${http.address().port}`));
for (const sig of ['SIGINT', 'SIGTERM']) process.on(sig, () => io.close(() => process.exit(0)));
