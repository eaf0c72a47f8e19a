// A TCP port on the loopback interface that nothing listens on at the moment of the call (shared with the benchmarks).
export { freePort } from "../../bench/free-port.js";
