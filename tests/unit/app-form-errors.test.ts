// The forms' message holder (app/components/forms/useFormErrors.ts): client checks with the shared zod schemas and
// server answers in the shared error shape ({ error: { code, message, fields } }) land on the same fields.
import { describe, expect, it } from 'vitest';
import { useFormErrors } from '../../app/components/forms/useFormErrors';
import { ApiError } from '../../app/api/client';
import { signUpSchema } from '../../shared/auth';

describe('useFormErrors', () => {
  it('shows the shared schema’s messages beside each field and returns null', () => {
    const errors = useFormErrors();
    expect(errors.check(signUpSchema, { name: ' ', email: 'not-an-address', password: 'short', roles: [] })).toBeNull();
    expect(errors.of('name')).toBe('Enter your name.');
    expect(errors.of('email')).toBe('Enter a valid e-mail address.');
    expect(errors.of('password')).toBe('Use at least 10 characters.');
    expect(errors.of('roles')).toBe('Pick at least one role.');
    expect(errors.message.value).toBeNull();
  });

  it('returns the parsed request (trimmed, lower-cased e-mail) and clears old messages when valid', () => {
    const errors = useFormErrors();
    errors.check(signUpSchema, {});
    const parsed = errors.check(signUpSchema, { name: ' Ada ', email: ' Ada@Example.TEST ', password: 'long-enough-password', roles: ['publisher'] });
    expect(parsed).toEqual({ name: 'Ada', email: 'ada@example.test', password: 'long-enough-password', roles: ['publisher'] });
    expect(Object.keys(errors.fields)).toEqual([]);
  });

  it('puts a 400/409 answer’s field messages beside their fields, without a banner', () => {
    const errors = useFormErrors();
    errors.show(new ApiError(409, { code: 'conflict', message: 'An account with this e-mail address already exists.', fields: { email: ['Taken.', 'Sign in instead.'] } }));
    expect(errors.of('email')).toBe('Taken. Sign in instead.');
    expect(errors.message.value).toBeNull();
  });

  it('shows answers without field messages (401, 429) above the form', () => {
    const errors = useFormErrors();
    errors.show(new ApiError(429, { code: 'rate_limited', message: 'Too many attempts; wait a minute.' }));
    expect(errors.message.value).toBe('Too many attempts; wait a minute.');
    expect(errors.of('email')).toBe('');
  });

  it('says the server could not be reached when fetch itself fails', () => {
    const errors = useFormErrors();
    errors.show(new TypeError('Failed to fetch'));
    expect(errors.message.value).toContain('could not be reached');
  });
});
