/**
 * Where the test cluster listens (scripts/cluster.sh derives every port from CLUSTER_PORT) and
 * the settings the test process needs to reach its database and bucket directly.
 */
export const clusterBase = Number(process.env.TEST_CLUSTER_PORT ?? 3900);

export const clusterPorts = {
  web: clusterBase,
  app: (i: number) => clusterBase + i,
  database: clusterBase + 10,
  node: (n: number) => clusterBase + 10 + n,
  bucket: clusterBase + 50,
};

export function clusterEnv(): Record<string, string> {
  return {
    DATABASE_HOST: "127.0.0.1",
    DATABASE_PORT: String(clusterPorts.database),
    DATABASE_NAME: "twistlog_cluster",
    STORAGE: "s3",
    S3_ENDPOINT: `http://127.0.0.1:${clusterPorts.bucket}`,
    S3_BUCKET: "twistlog",
    S3_REGION: "us-east-1",
    AWS_ACCESS_KEY_ID: "S3RVER",
    AWS_SECRET_ACCESS_KEY: "S3RVER",
  };
}

/** The test cluster's data (removed before and after the run). */
export const clusterDir = `${process.env.TMPDIR ?? "/tmp"}/twistlog-cluster-test-${clusterBase}`;
