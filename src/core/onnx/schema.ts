/**
 * Decoder for the subset of the ONNX schema (onnx/onnx.proto, proto2) that Brink needs.
 * Field numbers are those of onnx.proto; unknown fields are skipped as protobuf allows.
 */
import { ProtoReader, WireType } from './protobuf.ts';

/** TensorProto.DataType values used by the loader (onnx.proto). */
export const DataType = {
  FLOAT: 1,
  UINT8: 2,
  INT8: 3,
  INT32: 6,
  INT64: 7,
  BOOL: 9,
  FLOAT16: 10,
  DOUBLE: 11,
} as const;

/** AttributeProto.AttributeType values (onnx.proto). */
export const AttributeType = {
  FLOAT: 1,
  INT: 2,
  STRING: 3,
  TENSOR: 4,
  GRAPH: 5,
  FLOATS: 6,
  INTS: 7,
  STRINGS: 8,
  TENSORS: 9,
  GRAPHS: 10,
} as const;

export interface TensorProto {
  name: string;
  readonly dims: number[];
  dataType: number;
  rawData: Uint8Array | undefined;
  readonly floatData: number[];
  readonly int32Data: number[];
  readonly int64Data: number[];
  readonly doubleData: number[];
  /** data_location == EXTERNAL or external_data entries present. */
  external: boolean;
  /** The `location` entry of external_data, when given. */
  externalLocation: string | undefined;
}

export interface AttributeProto {
  name: string;
  type: number;
  f: number | undefined;
  i: number | undefined;
  s: Uint8Array | undefined;
  t: TensorProto | undefined;
  readonly floats: number[];
  readonly ints: number[];
  readonly strings: Uint8Array[];
  /** Graph-valued attributes (If/Loop/Scan bodies) are only counted, never decoded. */
  graphCount: number;
}

export interface NodeProto {
  readonly inputs: string[];
  readonly outputs: string[];
  name: string;
  opType: string;
  domain: string;
  readonly attributes: AttributeProto[];
}

/** One dimension of a declared shape: a size, a symbolic name, or unknown. */
export type DeclaredDim = number | string | null;

export interface ValueInfoProto {
  name: string;
  elemType: number | undefined;
  /** undefined when the type carries no shape at all. */
  dims: DeclaredDim[] | undefined;
}

export interface GraphProto {
  name: string;
  readonly nodes: NodeProto[];
  readonly initializers: TensorProto[];
  readonly inputs: ValueInfoProto[];
  readonly outputs: ValueInfoProto[];
  sparseInitializerCount: number;
}

export interface OperatorSetId {
  domain: string;
  version: number;
}

export interface ModelProto {
  irVersion: number;
  producerName: string;
  producerVersion: string;
  readonly opsetImports: OperatorSetId[];
  graph: GraphProto | undefined;
  functionCount: number;
}

/** Decode a whole .onnx file. Throws ProtobufError on malformed bytes. */
export function decodeModel(bytes: Uint8Array): ModelProto {
  const r = new ProtoReader(bytes);
  const model: ModelProto = { irVersion: 0, producerName: '', producerVersion: '', opsetImports: [], graph: undefined, functionCount: 0 };
  while (r.hasMore()) {
    const { field, wireType } = r.readKey();
    if (field === 1 && wireType === WireType.varint) model.irVersion = r.readVarint();
    else if (field === 2 && wireType === WireType.lengthDelimited) model.producerName = r.readString();
    else if (field === 3 && wireType === WireType.lengthDelimited) model.producerVersion = r.readString();
    else if (field === 7 && wireType === WireType.lengthDelimited) model.graph = decodeGraph(r.readMessage());
    else if (field === 8 && wireType === WireType.lengthDelimited) model.opsetImports.push(decodeOpset(r.readMessage()));
    else if (field === 25 && wireType === WireType.lengthDelimited) {
      r.skip(wireType);
      model.functionCount++;
    } else r.skip(wireType);
  }
  return model;
}

function decodeOpset(r: ProtoReader): OperatorSetId {
  const opset: OperatorSetId = { domain: '', version: 0 };
  while (r.hasMore()) {
    const { field, wireType } = r.readKey();
    if (field === 1 && wireType === WireType.lengthDelimited) opset.domain = r.readString();
    else if (field === 2 && wireType === WireType.varint) opset.version = r.readVarint();
    else r.skip(wireType);
  }
  return opset;
}

function decodeGraph(r: ProtoReader): GraphProto {
  const graph: GraphProto = { name: '', nodes: [], initializers: [], inputs: [], outputs: [], sparseInitializerCount: 0 };
  while (r.hasMore()) {
    const { field, wireType } = r.readKey();
    if (wireType !== WireType.lengthDelimited) {
      r.skip(wireType);
      continue;
    }
    if (field === 1) graph.nodes.push(decodeNode(r.readMessage()));
    else if (field === 2) graph.name = r.readString();
    else if (field === 5) graph.initializers.push(decodeTensor(r.readMessage()));
    else if (field === 11) graph.inputs.push(decodeValueInfo(r.readMessage()));
    else if (field === 12) graph.outputs.push(decodeValueInfo(r.readMessage()));
    else if (field === 15) {
      r.skip(wireType);
      graph.sparseInitializerCount++;
    } else r.skip(wireType);
  }
  return graph;
}

function decodeNode(r: ProtoReader): NodeProto {
  const node: NodeProto = { inputs: [], outputs: [], name: '', opType: '', domain: '', attributes: [] };
  while (r.hasMore()) {
    const { field, wireType } = r.readKey();
    if (wireType !== WireType.lengthDelimited) {
      r.skip(wireType);
      continue;
    }
    if (field === 1) node.inputs.push(r.readString());
    else if (field === 2) node.outputs.push(r.readString());
    else if (field === 3) node.name = r.readString();
    else if (field === 4) node.opType = r.readString();
    else if (field === 5) node.attributes.push(decodeAttribute(r.readMessage()));
    else if (field === 7) node.domain = r.readString();
    else r.skip(wireType);
  }
  return node;
}

function decodeAttribute(r: ProtoReader): AttributeProto {
  const a: AttributeProto = {
    name: '', type: 0, f: undefined, i: undefined, s: undefined, t: undefined, floats: [], ints: [], strings: [], graphCount: 0,
  };
  while (r.hasMore()) {
    const { field, wireType } = r.readKey();
    if (field === 1 && wireType === WireType.lengthDelimited) a.name = r.readString();
    else if (field === 20 && wireType === WireType.varint) a.type = r.readVarint();
    else if (field === 2 && wireType === WireType.fixed32) a.f = r.readFloat();
    else if (field === 3 && wireType === WireType.varint) a.i = r.readVarint();
    else if (field === 4 && wireType === WireType.lengthDelimited) a.s = r.readBytes();
    else if (field === 5 && wireType === WireType.lengthDelimited) a.t = decodeTensor(r.readMessage());
    else if (field === 7) r.readRepeatedFloat(wireType, a.floats);
    else if (field === 8) r.readRepeatedVarint(wireType, a.ints);
    else if (field === 9 && wireType === WireType.lengthDelimited) a.strings.push(r.readBytes());
    else if ((field === 6 || field === 11) && wireType === WireType.lengthDelimited) {
      r.skip(wireType);
      a.graphCount++;
    } else r.skip(wireType);
  }
  return a;
}

/** Decode a TensorProto; the payload stays a view into the file bytes until tensorData.ts reads it. */
export function decodeTensor(r: ProtoReader): TensorProto {
  const t: TensorProto = {
    name: '', dims: [], dataType: 0, rawData: undefined, floatData: [], int32Data: [], int64Data: [], doubleData: [],
    external: false, externalLocation: undefined,
  };
  while (r.hasMore()) {
    const { field, wireType } = r.readKey();
    if (field === 1) r.readRepeatedVarint(wireType, t.dims);
    else if (field === 2 && wireType === WireType.varint) t.dataType = r.readVarint();
    else if (field === 4) r.readRepeatedFloat(wireType, t.floatData);
    else if (field === 5) r.readRepeatedVarint(wireType, t.int32Data);
    else if (field === 7) r.readRepeatedVarint(wireType, t.int64Data);
    else if (field === 8 && wireType === WireType.lengthDelimited) t.name = r.readString();
    else if (field === 9 && wireType === WireType.lengthDelimited) t.rawData = r.readBytes();
    else if (field === 10) r.readRepeatedDouble(wireType, t.doubleData);
    else if (field === 13 && wireType === WireType.lengthDelimited) {
      t.external = true;
      const entry = decodeStringEntry(r.readMessage());
      if (entry.key === 'location') t.externalLocation = entry.value;
    } else if (field === 14 && wireType === WireType.varint) {
      if (r.readVarint() === 1) t.external = true;
    } else r.skip(wireType);
  }
  return t;
}

function decodeStringEntry(r: ProtoReader): { key: string; value: string } {
  let key = '';
  let value = '';
  while (r.hasMore()) {
    const { field, wireType } = r.readKey();
    if (field === 1 && wireType === WireType.lengthDelimited) key = r.readString();
    else if (field === 2 && wireType === WireType.lengthDelimited) value = r.readString();
    else r.skip(wireType);
  }
  return { key, value };
}

function decodeValueInfo(r: ProtoReader): ValueInfoProto {
  const info: ValueInfoProto = { name: '', elemType: undefined, dims: undefined };
  while (r.hasMore()) {
    const { field, wireType } = r.readKey();
    if (field === 1 && wireType === WireType.lengthDelimited) info.name = r.readString();
    else if (field === 2 && wireType === WireType.lengthDelimited) decodeTypeProto(r.readMessage(), info);
    else r.skip(wireType);
  }
  return info;
}

/** TypeProto → tensor_type (1) → elem_type (1), shape (2) → dim (1) → dim_value (1) | dim_param (2). */
function decodeTypeProto(r: ProtoReader, into: ValueInfoProto): void {
  while (r.hasMore()) {
    const { field, wireType } = r.readKey();
    if (field !== 1 || wireType !== WireType.lengthDelimited) {
      r.skip(wireType);
      continue;
    }
    const tensorType = r.readMessage();
    while (tensorType.hasMore()) {
      const key = tensorType.readKey();
      if (key.field === 1 && key.wireType === WireType.varint) into.elemType = tensorType.readVarint();
      else if (key.field === 2 && key.wireType === WireType.lengthDelimited) into.dims = decodeShape(tensorType.readMessage());
      else tensorType.skip(key.wireType);
    }
  }
}

function decodeShape(r: ProtoReader): DeclaredDim[] {
  const dims: DeclaredDim[] = [];
  while (r.hasMore()) {
    const { field, wireType } = r.readKey();
    if (field !== 1 || wireType !== WireType.lengthDelimited) {
      r.skip(wireType);
      continue;
    }
    const dimReader = r.readMessage();
    let dim: DeclaredDim = null;
    while (dimReader.hasMore()) {
      const key = dimReader.readKey();
      if (key.field === 1 && key.wireType === WireType.varint) dim = dimReader.readVarint();
      else if (key.field === 2 && key.wireType === WireType.lengthDelimited) dim = dimReader.readString() || null;
      else dimReader.skip(key.wireType);
    }
    dims.push(dim);
  }
  return dims;
}
