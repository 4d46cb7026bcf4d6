import { describe, expect, it } from "vitest";
import { parseEnv } from "../env.server";
import { storeConfigFrom } from "./config";

const BASE = {
  DATABASE_URL: "postgres://postgres@127.0.0.1:5432/benchreel",
  SESSION_SECRET: "a-local-only-secret-value",
  PUBLIC_URL: "http://127.0.0.1:3000",
  SMTP_URL: "smtp://127.0.0.1:2525",
};

describe("where recordings are kept (STORAGE_URL or the S3 variables)", () => {
  it("keeps the folder when nothing names a store", () => {
    expect(storeConfigFrom({})).toEqual({ kind: "folder" });
    expect(storeConfigFrom({ STORAGE_URL: "folder" })).toEqual({ kind: "folder" });
  });

  it("reads an s3:// URL as HTTPS and s3+http:// as plain HTTP, keys decoded", () => {
    expect(storeConfigFrom({ STORAGE_URL: "s3://AK%2B1:se%2Fcret@store.larkspur.example/recordings?region=eu-west-2" })).toEqual({
      kind: "s3",
      endpoint: "https://store.larkspur.example",
      bucket: "recordings",
      region: "eu-west-2",
      accessKeyId: "AK+1",
      secretAccessKey: "se/cret",
    });
    expect(storeConfigFrom({ STORAGE_URL: "s3+http://k:s@127.0.0.1:9100/benchreel" })).toMatchObject({
      endpoint: "http://127.0.0.1:9100",
      region: "us-east-1",
    });
  });

  it("takes the keys from the AWS variables when the URL has none", () => {
    expect(
      storeConfigFrom({ STORAGE_URL: "s3://store.larkspur.example/benchreel", AWS_ACCESS_KEY_ID: "a", AWS_SECRET_ACCESS_KEY: "b" }),
    ).toMatchObject({ accessKeyId: "a", secretAccessKey: "b" });
  });

  it("reads the usual S3 variables", () => {
    expect(
      storeConfigFrom({
        S3_BUCKET: "benchreel",
        S3_ENDPOINT: "https://store.larkspur.example/",
        AWS_ACCESS_KEY_ID: "a",
        AWS_SECRET_ACCESS_KEY: "b",
        AWS_REGION: "ca-central-1",
      }),
    ).toEqual({
      kind: "s3",
      endpoint: "https://store.larkspur.example",
      bucket: "benchreel",
      region: "ca-central-1",
      accessKeyId: "a",
      secretAccessKey: "b",
    });
  });

  it("says what is wrong with a store that cannot work", () => {
    expect(storeConfigFrom({ STORAGE_URL: "ftp://x/y" })).toMatch(/s3:\/\//);
    expect(storeConfigFrom({ STORAGE_URL: "s3://k:s@host/Bad_Bucket" })).toMatch(/bucket/);
    expect(storeConfigFrom({ STORAGE_URL: "s3://host/benchreel" })).toMatch(/access key/);
    expect(storeConfigFrom({ S3_BUCKET: "benchreel" })).toMatch(/S3_ENDPOINT/);
  });

  it("refuses to start with such a store, naming the variable and not its value", () => {
    expect(() => parseEnv({ ...BASE, STORAGE_URL: "s3://AKSECRET@host/benchreel" })).toThrow(/STORAGE_URL: needs an access key/);
    expect(() => parseEnv({ ...BASE, STORAGE_URL: "s3://AKSECRET@host/benchreel" })).not.toThrow(/AKSECRET/);
    expect(parseEnv({ ...BASE }).STORAGE_URL).toBeUndefined();
  });
});
