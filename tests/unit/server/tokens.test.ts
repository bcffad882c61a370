// Session JWTs and API token secrets (server/lib/tokens.ts).
import { createHmac } from 'node:crypto';
import jwt from 'jsonwebtoken';
import { describe, expect, it } from 'vitest';
import { API_TOKEN_PREFIX, newApiToken, newInvitationSecret, sha256Hex, signSession, verifySession } from '../../../server/lib/tokens.ts';

const SECRET = 'unit-test-secret-of-at-least-32-characters';
const USER = '3f1c2a9e-5b7d-4e21-9c3a-0f6b8d2e4a17';
const UUID = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/;

const b64url = (value: object) => Buffer.from(JSON.stringify(value)).toString('base64url');

describe('signSession / verifySession', () => {
  it('When a session is signed and verified with the same secret, then the claims come back unchanged', () => {
    // Arrange
    const before = Date.now();
    // Act
    const { token, claims } = signSession(USER, SECRET, 2);
    const verified = verifySession(token, SECRET);
    // Assert
    expect(verified).toEqual(claims);
    expect(claims.userId).toBe(USER);
    expect(claims.jti).toMatch(UUID);
    // exp is whole seconds (RFC 7519 NumericDate), two hours after issue.
    expect(claims.expiresAt.getTime()).toBeGreaterThanOrEqual(Math.floor(before / 1000) * 1000 + 2 * 3_600_000);
    expect(claims.expiresAt.getTime()).toBeLessThanOrEqual(Date.now() + 2 * 3_600_000);
    expect(jwt.decode(token, { complete: true })?.header).toMatchObject({ alg: 'HS256', typ: 'JWT' });
  });

  it('When two sessions are signed for the same user, then their ids differ (so one can be revoked alone)', () => {
    expect(signSession(USER, SECRET, 1).claims.jti).not.toBe(signSession(USER, SECRET, 1).claims.jti);
  });

  it('When the payload is altered, then the signature no longer matches and the token is refused', () => {
    // Arrange
    const { token } = signSession(USER, SECRET, 1);
    const [header, payload, signature] = token.split('.');
    const claims = JSON.parse(Buffer.from(payload, 'base64url').toString());
    // Act
    const tampered = [header, b64url({ ...claims, sub: '00000000-0000-4000-8000-000000000000' }), signature].join('.');
    // Assert
    expect(verifySession(tampered, SECRET)).toBeNull();
    expect(verifySession(token, 'another-secret-of-at-least-32-characters')).toBeNull();
  });

  it('When the token has expired, then it is refused', () => {
    // Arrange: signed by hand (RFC 7519 HS256: HMAC-SHA256 over header.payload) with exp one second in the past.
    const now = Math.floor(Date.now() / 1000);
    const head = b64url({ alg: 'HS256', typ: 'JWT' });
    const body = b64url({ typ: 'session', sub: USER, jti: crypto.randomUUID(), iss: 'gatepost', iat: now - 100, exp: now - 1 });
    const sig = createHmac('sha256', SECRET).update(`${head}.${body}`).digest('base64url');
    const expired = `${head}.${body}.${sig}`;
    // The same construction with a future exp is accepted, so only the expiry is what refuses the first one.
    const fresh = `${head}.${b64url({ ...JSON.parse(Buffer.from(body, 'base64url').toString()), exp: now + 60 })}`;
    const freshToken = `${fresh}.${createHmac('sha256', SECRET).update(fresh).digest('base64url')}`;
    // Act + Assert
    expect(verifySession(expired, SECRET)).toBeNull();
    expect(verifySession(freshToken, SECRET)).toMatchObject({ userId: USER });
  });

  it('When a token is unsigned, of another type or issuer, or malformed, then it is refused', () => {
    const now = Math.floor(Date.now() / 1000);
    const unsigned = `${b64url({ alg: 'none', typ: 'JWT' })}.${b64url({ typ: 'session', sub: USER, jti: 'x', iss: 'gatepost', exp: now + 60 })}.`;
    const otherType = jwt.sign({ typ: 'invite' }, SECRET, { algorithm: 'HS256', subject: USER, jwtid: 'x', issuer: 'gatepost', expiresIn: 60 });
    const otherIssuer = jwt.sign({ typ: 'session' }, SECRET, { algorithm: 'HS256', subject: USER, jwtid: 'x', issuer: 'elsewhere', expiresIn: 60 });
    const noExpiry = jwt.sign({ typ: 'session' }, SECRET, { algorithm: 'HS256', subject: USER, jwtid: 'x', issuer: 'gatepost' });
    for (const token of [unsigned, otherType, otherIssuer, noExpiry, 'not.a.jwt', '']) expect(verifySession(token, SECRET), token).toBeNull();
  });
});

describe('API tokens and invitation secrets', () => {
  it('When hashing, then sha256Hex gives the FIPS 180-2 test vectors', () => {
    // FIPS 180-2, Appendix B.1 ("abc") and the SHA-256 of the empty string (NIST CAVP, ShortMsg Len = 0).
    expect(sha256Hex('abc')).toBe('ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad');
    expect(sha256Hex('')).toBe('e3b0c44298fc1c149afbf4c8996fb92427ae41e4649b934ca495991b7852b855');
  });

  it('When a personal API token is made, then it carries 256 random bits after gpt_ and only its hash and prefix are kept', () => {
    // Act
    const a = newApiToken();
    const b = newApiToken();
    // Assert: 32 bytes are 43 base64url characters (RFC 4648 §5, no padding).
    expect(a.token).toMatch(/^gpt_[A-Za-z0-9_-]{43}$/);
    expect(API_TOKEN_PREFIX).toBe('gpt_');
    expect(a.hash).toBe(sha256Hex(a.token));
    expect(a.hash).toMatch(/^[0-9a-f]{64}$/);
    expect(a.prefix).toBe(a.token.slice(0, 10));
    expect(b.token).not.toBe(a.token);
  });

  it('When an invitation secret is made, then its hash is the SHA-256 of the secret', () => {
    const { secret, hash } = newInvitationSecret();
    expect(secret).toMatch(/^[A-Za-z0-9_-]{32}$/); // 24 bytes in base64url
    expect(hash).toBe(sha256Hex(secret));
  });
});
