import { describe } from 'vitest';
import { sceneTests } from './scene-check';

describe('rendered scenes, first half', () => sceneTests(0));
