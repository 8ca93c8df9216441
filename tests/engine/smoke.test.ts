import { z } from 'zod';
test('ts-jest runs', () => { expect(z.number().parse(1)).toBe(1); });
