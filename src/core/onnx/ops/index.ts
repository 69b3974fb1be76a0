/** Every operator the loader translates, by ONNX op type (default domain). */
import type { OpCompiler } from '../context.ts';
import { ARITHMETIC_OPS } from './arithmetic.ts';
import { CONV_OPS } from './conv.ts';
import { ELEMENTWISE_OPS } from './elementwise.ts';
import { LINEAR_OPS } from './linear.ts';
import { POOL_OPS } from './pool.ts';
import { REDUCE_OPS } from './reduce.ts';
import { SHAPE_ARITH_OPS } from './shapeArith.ts';
import { TENSOR_SHAPE_OPS } from './tensorShape.ts';

export const OPERATORS: Readonly<Record<string, OpCompiler>> = {
  ...ELEMENTWISE_OPS,
  ...ARITHMETIC_OPS,
  ...CONV_OPS,
  ...POOL_OPS,
  ...LINEAR_OPS,
  ...REDUCE_OPS,
  ...TENSOR_SHAPE_OPS,
  ...SHAPE_ARITH_OPS,
};

/** Supported op types, sorted (for messages and the README). */
export function supportedOperators(): string[] {
  return Object.keys(OPERATORS).sort();
}
