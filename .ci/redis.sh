#!/usr/bin/env bash
# Sourced by .ci/run (`. .ci/redis.sh`): installs Debian's redis-server when missing, starts it on a loopback port
# with no persistence, and exports TEST_REDIS_URL for test/jobs-redis.test.ts (which fails in CI without it).
redis_port="${TEST_REDIS_PORT:-6390}"
if ! command -v redis-server >/dev/null; then
  apt-get update -qq
  apt-get install -y -qq --no-install-recommends redis-server >/dev/null
fi
redis-server --bind 127.0.0.1 --port "$redis_port" --save '' --appendonly no --daemonize yes \
  --maxmemory 256mb --maxmemory-policy noeviction --logfile "${TMPDIR:-/tmp}/antisolar-ci-redis.log"
for _ in $(seq 1 50); do
  redis-cli -p "$redis_port" ping 2>/dev/null | grep -q PONG && break
  sleep 0.1
done
redis-cli -p "$redis_port" ping | grep -q PONG || { echo "redis-server did not start on port $redis_port" >&2; exit 1; }
export TEST_REDIS_URL="redis://127.0.0.1:${redis_port}"
echo "redis-server $(redis-server --version | sed -n 's/.*v=\([^ ]*\).*/\1/p') on ${TEST_REDIS_URL}"
